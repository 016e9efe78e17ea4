/**
 * The engine's one careful summation and one tolerance helper.
 */

export const LN2 = Math.LN2;

/**
 * Neumaier's compensated sum (Neumaier 1974, an improvement of Kahan summation) of an array-like.
 * O(n). Never throws; returns NaN only if an input is NaN (validation keeps NaN out of the engine).
 */
export function compensatedSum(values: ArrayLike<number>, start = 0, end = values.length): number {
  let sum = 0;
  let c = 0;
  for (let i = start; i < end; i++) {
    const x = values[i];
    const t = sum + x;
    if (Math.abs(sum) >= Math.abs(x)) c += sum - t + x;
    else c += x - t + sum;
    sum = t;
  }
  return sum + c;
}

/** A running compensated sum for values produced one at a time. */
export class Accumulator {
  private sum = 0;
  private c = 0;
  /** Adds x. O(1). */
  add(x: number): void {
    const t = this.sum + x;
    if (Math.abs(this.sum) >= Math.abs(x)) this.c += this.sum - t + x;
    else this.c += x - t + this.sum;
    this.sum = t;
  }
  /** The sum so far. O(1). */
  value(): number {
    return this.sum + this.c;
  }
}

/** Tolerance for comparing two computed figures: |a − b| ≤ abs + rel·max(|a|, |b|). */
export interface Tolerance {
  abs: number;
  rel: number;
}

/** The tolerance used for verification unless a check needs its own (common practice, no source). */
export const DEFAULT_TOLERANCE: Tolerance = { abs: 1e-9, rel: 1e-9 };

/** Tolerance on a probability row sum (DESIGN: 1e-9). */
export const ROW_SUM_TOLERANCE = 1e-9;

/** Whether a and b agree within the tolerance. O(1). */
export function closeTo(a: number, b: number, tol: Tolerance = DEFAULT_TOLERANCE): boolean {
  if (!Number.isFinite(a) || !Number.isFinite(b)) return a === b;
  return Math.abs(a - b) <= tol.abs + tol.rel * Math.max(Math.abs(a), Math.abs(b));
}

/** The allowed difference between a and b under the tolerance. O(1). */
export function allowedDifference(a: number, b: number, tol: Tolerance = DEFAULT_TOLERANCE): number {
  return tol.abs + tol.rel * Math.max(Math.abs(a), Math.abs(b));
}

/** −x·log₂x with the convention 0·log 0 = 0. O(1). */
export function negXLog2X(x: number): number {
  return x > 0 ? -x * Math.log2(x) : 0;
}

/** Shannon entropy in bits of a probability vector (assumed valid). O(n), compensated. */
export function shannonEntropyBits(p: ArrayLike<number>): number {
  const acc = new Accumulator();
  for (let i = 0; i < p.length; i++) acc.add(negXLog2X(p[i]));
  return acc.value();
}

/** Binary entropy h(p) in bits. O(1). */
export function binaryEntropyBits(p: number): number {
  return negXLog2X(p) + negXLog2X(1 - p);
}

/** Bits to nats. */
export function bitsToNats(bits: number): number {
  return bits * LN2;
}
