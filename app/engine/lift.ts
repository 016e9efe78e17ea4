/**
 * Lifting an order-k chain to the first-order chain on its k-tuple contexts: context
 * c = (x₁…x_k) moves to (x₂…x_k, y) with probability P[c][y]. Contexts are numbered in lexicographic
 * order of alphabet indices, c = Σ x_t m^(k−1−t), the row order of the parameter format.
 */
import type { SparseMatrix } from "./types";

/** The label of context `index` of an order-k chain over `alphabet`, e.g. "a·b". O(k). Throws nothing. */
export function contextLabel(index: number, alphabet: readonly string[], order: number): string {
  const m = alphabet.length;
  const parts: string[] = new Array(order);
  let c = index;
  for (let t = order - 1; t >= 0; t--) {
    parts[t] = alphabet[c % m];
    c = Math.floor(c / m);
  }
  return parts.join("·");
}

/** All m^k context labels in row order. O(m^k·k). Throws RangeError if m^k exceeds `limit`. */
export function contextLabels(alphabet: readonly string[], order: number, limit = 1 << 24): string[] {
  const count = alphabet.length ** order;
  if (count > limit) throw new RangeError(`an order-${order} chain over ${alphabet.length} symbols has ${count} contexts; the limit is ${limit}`);
  const out = new Array<string>(count);
  for (let c = 0; c < count; c++) out[c] = order === 1 ? alphabet[c] : contextLabel(c, alphabet, order);
  return out;
}

/**
 * The lifted first-order chain of an order-k chain with rows P (m^k rows of m entries, assumed
 * validated), as CSR. Zero probabilities are left out, so the sparsity pattern is the transition
 * graph; each context has at most m successors and the columns of a row come out sorted.
 * O(m^(k+1)) time and memory. Throws RangeError if P does not have m^k rows of m entries.
 */
export function liftOrderK(P: readonly (readonly number[])[], alphabetSize: number, order: number): SparseMatrix {
  const m = alphabetSize;
  const n = m ** order;
  if (P.length !== n) throw new RangeError(`liftOrderK: expected ${n} rows, got ${P.length}`);
  let nnz = 0;
  for (let c = 0; c < n; c++) {
    if (P[c].length !== m) throw new RangeError(`liftOrderK: row ${c} has ${P[c].length} entries, expected ${m}`);
    for (let y = 0; y < m; y++) if (P[c][y] > 0) nnz++;
  }
  const rowPtr = new Int32Array(n + 1);
  const col = new Int32Array(nnz);
  const val = new Float64Array(nnz);
  let p = 0;
  for (let c = 0; c < n; c++) {
    // Dropping the oldest symbol: (c mod m^(k−1))·m is the base of the successor contexts.
    const base = (c % (n / m)) * m;
    for (let y = 0; y < m; y++) {
      const v = P[c][y];
      if (v > 0) {
        col[p] = base + y;
        val[p] = v;
        p++;
      }
    }
    rowPtr[c + 1] = p;
  }
  return { n, rowPtr, col, val };
}

/**
 * The law of one symbol under a stationary context law μ of an order-k chain (the marginal of the
 * last symbol of the context, equal to any other position by stationarity). O(m^k).
 * Throws RangeError if μ's length is not a power m^k.
 */
export function symbolMarginal(mu: ArrayLike<number>, alphabetSize: number): number[] {
  const m = alphabetSize;
  if (m < 1 || mu.length % m !== 0) throw new RangeError(`symbolMarginal: ${mu.length} contexts is not a multiple of ${m}`);
  const out = new Array<number>(m).fill(0);
  for (let c = 0; c < mu.length; c++) out[c % m] += mu[c];
  return out;
}
