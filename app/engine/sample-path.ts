/**
 * Seeded sample paths of i.i.d. sources, Markov chains and hidden Markov sources.
 *
 * Every draw is by inversion of a cumulative table: one uniform per symbol, found by binary search
 * for the first cumulative value exceeding u · (row total). Zero-probability outcomes have the same
 * cumulative value as their predecessor, so they are never chosen, and scaling by the computed row
 * total (not 1) keeps rows that sum to 1 − 1e−16 from running off the end.
 */

import type { DenseMatrix, SparseMatrix, UniformSource } from "./types";
import type { EmissionMatrix } from "./hidden";

/** Misuse of a sampler: bad length, mismatched shapes, a distribution with no mass. */
export class SamplePathError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "SamplePathError";
  }
}

/** Longest path a sampler will allocate (2^28 symbols, 1 GiB as Int32Array). */
export const MAX_PATH_LENGTH = 2 ** 28;

function assertLength(length: number): void {
  if (!Number.isSafeInteger(length) || length <= 0) {
    throw new SamplePathError(`path length must be a positive integer, got ${String(length)}`);
  }
  if (length > MAX_PATH_LENGTH) {
    throw new SamplePathError(`path length ${length} exceeds the limit of ${MAX_PATH_LENGTH}`);
  }
}

/**
 * Cumulative sums of `values[start..end)` into `out[outStart..]`; returns the row total.
 * Throws if an entry is negative or not finite, or if the total is not positive.
 */
function cumulate(
  values: ArrayLike<number>,
  start: number,
  end: number,
  out: Float64Array,
  outStart: number,
  what: string,
): number {
  let acc = 0;
  for (let k = start; k < end; k++) {
    const v = values[k];
    if (!(v >= 0) || !Number.isFinite(v)) {
      throw new SamplePathError(`${what}: entry ${k - start} is ${String(v)}, expected a finite number ≥ 0`);
    }
    acc += v;
    out[outStart + k - start] = acc;
  }
  if (!(acc > 0)) throw new SamplePathError(`${what} has no probability mass`);
  return acc;
}

/** Index in [lo, hi) of the first cumulative value greater than x; hi − 1's last positive entry if none. */
function searchCumulative(cum: Float64Array, lo: number, hi: number, x: number): number {
  const last = hi - 1;
  if (x >= cum[last]) {
    // Only reachable through rounding of u · total; return the last outcome with positive mass.
    let k = last;
    while (k > lo && cum[k] === cum[k - 1]) k--;
    return k;
  }
  let a = lo;
  let b = last;
  while (a < b) {
    const mid = (a + b) >>> 1;
    if (cum[mid] > x) b = mid;
    else a = mid + 1;
  }
  return a;
}

/**
 * A path of `length` i.i.d. draws from the distribution `p` (indices into p). One uniform per
 * draw. O(|p| + length · log |p|). Throws SamplePathError for a non-positive length, an entry of p
 * that is negative or not finite, or p with total mass 0.
 */
export function sampleIidPath(p: ArrayLike<number>, length: number, rng: UniformSource): Int32Array {
  assertLength(length);
  const m = p.length;
  if (m === 0) throw new SamplePathError("distribution is empty");
  const cum = new Float64Array(m);
  const total = cumulate(p, 0, m, cum, 0, "distribution");
  const path = new Int32Array(length);
  for (let t = 0; t < length; t++) path[t] = searchCumulative(cum, 0, m, rng.next() * total);
  return path;
}

function isSparse(P: DenseMatrix | SparseMatrix): P is SparseMatrix {
  return (P as SparseMatrix).rowPtr !== undefined;
}

/** A sampler of the next state of a Markov chain given the current one (dense or CSR). */
interface TransitionSampler {
  n: number;
  next(state: number, u: number): number;
}

function transitionSampler(P: DenseMatrix | SparseMatrix): TransitionSampler {
  const n = P.n;
  if (!Number.isSafeInteger(n) || n <= 0) throw new SamplePathError(`matrix order must be a positive integer, got ${String(n)}`);
  if (isSparse(P)) {
    if (P.rowPtr.length !== n + 1) {
      throw new SamplePathError(`sparse matrix: rowPtr has length ${P.rowPtr.length}, expected ${n + 1}`);
    }
    const nnz = P.rowPtr[n];
    if (P.rowPtr[0] !== 0 || nnz > P.col.length || nnz > P.val.length) {
      throw new SamplePathError("sparse matrix: rowPtr does not match col/val");
    }
    const cum = new Float64Array(nnz);
    const totals = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const a = P.rowPtr[i];
      const b = P.rowPtr[i + 1];
      if (b < a) throw new SamplePathError(`sparse matrix: rowPtr decreases at row ${i}`);
      for (let k = a; k < b; k++) {
        const c = P.col[k];
        if (!Number.isInteger(c) || c < 0 || c >= n) {
          throw new SamplePathError(`sparse matrix: row ${i} has column index ${c} outside 0..${n - 1}`);
        }
      }
      totals[i] = b > a ? cumulate(P.val, a, b, cum, a, `transition row ${i}`) : 0;
    }
    return {
      n,
      next(state, u) {
        const a = P.rowPtr[state];
        const b = P.rowPtr[state + 1];
        if (b <= a || !(totals[state] > 0)) throw new SamplePathError(`transition row ${state} has no probability mass`);
        return P.col[searchCumulative(cum, a, b, u * totals[state])];
      },
    };
  }
  if (P.data.length !== n * n) {
    throw new SamplePathError(`dense matrix: data has length ${P.data.length}, expected ${n}×${n} = ${n * n}`);
  }
  const cum = new Float64Array(n * n);
  const totals = new Float64Array(n);
  for (let i = 0; i < n; i++) totals[i] = cumulate(P.data, i * n, (i + 1) * n, cum, i * n, `transition row ${i}`);
  return {
    n,
    next(state, u) {
      return searchCumulative(cum, state * n, (state + 1) * n, u * totals[state]) - state * n;
    },
  };
}

function initialState(initial: ArrayLike<number>, n: number, rng: UniformSource): number {
  if (initial.length !== n) {
    throw new SamplePathError(`initial distribution has ${initial.length} entries, expected ${n}`);
  }
  const cum = new Float64Array(n);
  const total = cumulate(initial, 0, n, cum, 0, "initial distribution");
  return searchCumulative(cum, 0, n, rng.next() * total);
}

/**
 * A path X_1 … X_length of the Markov chain with transition matrix P (dense or CSR), X_1 drawn
 * from `initial`; one uniform per state. O(nnz(P) + length · log n). Throws SamplePathError for a
 * non-positive length, an initial vector of the wrong size or without mass, a row with a negative
 * or non-finite entry, a dense row without mass, or a visited sparse row without entries.
 */
export function sampleMarkovPath(
  P: DenseMatrix | SparseMatrix,
  initial: ArrayLike<number>,
  length: number,
  rng: UniformSource,
): Int32Array {
  assertLength(length);
  const sampler = transitionSampler(P);
  const path = new Int32Array(length);
  let x = initialState(initial, sampler.n, rng);
  path[0] = x;
  for (let t = 1; t < length; t++) {
    x = sampler.next(x, rng.next());
    path[t] = x;
  }
  return path;
}

/**
 * A path of a hidden Markov source: hidden states X_1 … X_length of the chain P with X_1 drawn
 * from `initial`, and symbols Y_t drawn from the emission row B[X_t]. Draw order per step:
 * X_t, then Y_t (so a path is reproducible from the seed). O(s² + s·k + length · log(s·k)).
 * Throws SamplePathError for a non-positive length, shapes that do not match (B.states ≠ P.n,
 * B.data ≠ states × symbols, initial ≠ P.n) or a row without mass.
 */
export function sampleHiddenPath(
  P: DenseMatrix,
  B: EmissionMatrix,
  initial: ArrayLike<number>,
  length: number,
  rng: UniformSource,
): { states: Int32Array; symbols: Int32Array } {
  assertLength(length);
  const sampler = transitionSampler(P);
  const s = sampler.n;
  const k = B.symbols;
  if (B.states !== s) throw new SamplePathError(`emission matrix has ${B.states} states, the hidden chain has ${s}`);
  if (!Number.isSafeInteger(k) || k <= 0) throw new SamplePathError(`emission alphabet size must be a positive integer, got ${String(k)}`);
  if (B.data.length !== s * k) {
    throw new SamplePathError(`emission matrix: data has length ${B.data.length}, expected ${s}×${k} = ${s * k}`);
  }
  const cumB = new Float64Array(s * k);
  const totB = new Float64Array(s);
  for (let i = 0; i < s; i++) totB[i] = cumulate(B.data, i * k, (i + 1) * k, cumB, i * k, `emission row ${i}`);
  const states = new Int32Array(length);
  const symbols = new Int32Array(length);
  let x = initialState(initial, s, rng);
  for (let t = 0; t < length; t++) {
    if (t > 0) x = sampler.next(x, rng.next());
    states[t] = x;
    symbols[t] = searchCumulative(cumB, x * k, (x + 1) * k, rng.next() * totB[x]) - x * k;
  }
  return { states, symbols };
}
