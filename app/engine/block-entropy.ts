/**
 * Block entropies H(X₁…Xₙ) of a stationary Markov source of order k, and the sequences
 * H(Xⁿ)/n and H(Xₙ | Xⁿ⁻¹) that converge to the entropy rate.
 */
import { Accumulator, negXLog2X } from "./numeric";
import { EngineNumericError } from "./stationary";

/** One row of the block-entropy table (bits). */
export interface BlockEntropy {
  n: number;
  /** H(X₁…Xₙ). */
  joint: number;
  /** H(X₁…Xₙ)/n. */
  perSymbol: number;
  /** H(Xₙ | X₁…Xₙ₋₁); for n = 1, H(X₁). */
  conditional: number;
}

// Largest context table accepted (2²⁴ entries: 128 MiB of doubles would be the caller's already).
const MAX_CONTEXTS = 1 << 24;
const MAX_LENGTH = 1_000_000;

/**
 * Exact block entropies for n = 1 … maxLength of a stationary order-k Markov source over m symbols.
 * contextStationary is the stationary law of (X₁…X_k), contexts in lexicographic order of alphabet
 * indices (index Σ x_t m^(k−1−t)); rateBits is the source's entropy rate. For n ≤ k the law of
 * (X₁…Xₙ) is the context law marginalised onto its first n symbols, and H(Xₙ | Xⁿ⁻¹) is computed
 * directly as Σ_prefix p(prefix)·H(next | prefix) (no subtraction of two large entropies); for
 * n > k the Markov property gives H(X₁…Xₙ) = H(X₁…X_k) + (n − k)·H and H(Xₙ | Xⁿ⁻¹) = H.
 * Order 0 (i.i.d.) takes contextStationary = [1] and rateBits = H(p).
 * O(m^k·k + maxLength). Throws EngineNumericError on non-integer or out-of-range sizes, a context
 * law of the wrong length or with negative / non-finite entries or not summing to 1 (within 1e-9),
 * or a negative / non-finite rate.
 */
export function blockEntropies(args: {
  alphabetSize: number;
  order: number;
  contextStationary: ArrayLike<number>;
  rateBits: number;
  maxLength: number;
}): BlockEntropy[] {
  const { alphabetSize: m, order: k, contextStationary: pi, rateBits: h, maxLength } = args;
  if (!Number.isInteger(m) || m < 1) throw new EngineNumericError(`blockEntropies: alphabet size must be a positive integer, got ${m}`);
  if (!Number.isInteger(k) || k < 0) throw new EngineNumericError(`blockEntropies: order must be an integer ≥ 0, got ${k}`);
  if (!Number.isInteger(maxLength) || maxLength < 1 || maxLength > MAX_LENGTH) {
    throw new EngineNumericError(`blockEntropies: maxLength must be an integer in 1…${MAX_LENGTH}, got ${maxLength}`);
  }
  if (!(h >= 0) || h === Infinity) throw new EngineNumericError(`blockEntropies: rate ${h} must be finite and ≥ 0`);
  const contexts = Math.pow(m, k);
  if (contexts > MAX_CONTEXTS) throw new EngineNumericError(`blockEntropies: ${m}^${k} contexts is too many`);
  if (pi.length !== contexts) throw new EngineNumericError(`blockEntropies: context law has ${pi.length} entries, expected ${m}^${k} = ${contexts}`);
  const sum = new Accumulator();
  for (let c = 0; c < contexts; c++) {
    const x = pi[c];
    if (!(x >= 0) || x === Infinity) throw new EngineNumericError(`blockEntropies: context law entry ${c} is ${x}`);
    sum.add(x);
  }
  if (Math.abs(sum.value() - 1) > 1e-9) throw new EngineNumericError(`blockEntropies: context law sums to ${sum.value()}, not 1`);

  // marginals[t] = law of (X₁…X_t), t = 0…k; marginal t−1 sums consecutive groups of m in marginal t.
  const marginals: Float64Array[] = new Array(k + 1);
  marginals[k] = Float64Array.from(pi);
  for (let t = k - 1; t >= 0; t--) {
    const finer = marginals[t + 1];
    const coarse = new Float64Array(finer.length / m);
    for (let c = 0; c < coarse.length; c++) {
      const acc = new Accumulator();
      for (let s = 0; s < m; s++) acc.add(finer[c * m + s]);
      coarse[c] = acc.value();
    }
    marginals[t] = coarse;
  }
  const entropyOf = (p: Float64Array): number => {
    const acc = new Accumulator();
    for (let i = 0; i < p.length; i++) acc.add(negXLog2X(p[i]));
    return acc.value();
  };
  // H(X_t | X^{t−1}) = Σ_prefix p(prefix) H(next | prefix) from marginal t.
  const conditionalOf = (t: number): number => {
    const fine = marginals[t];
    const coarse = marginals[t - 1];
    const acc = new Accumulator();
    for (let c = 0; c < coarse.length; c++) {
      const pc = coarse[c];
      if (!(pc > 0)) continue;
      const row = new Accumulator();
      for (let s = 0; s < m; s++) row.add(negXLog2X(fine[c * m + s] / pc));
      acc.add(pc * row.value());
    }
    return acc.value();
  };

  const out: BlockEntropy[] = [];
  const jointK = entropyOf(marginals[k]);
  for (let n = 1; n <= maxLength; n++) {
    let joint: number;
    let conditional: number;
    if (n <= k) {
      joint = entropyOf(marginals[n]);
      conditional = conditionalOf(n);
    } else {
      joint = jointK + (n - k) * h;
      conditional = h;
    }
    out.push({ n, joint, perSymbol: joint / n, conditional });
  }
  return out;
}
