/**
 * Rényi entropy rate of an irreducible Markov source (Rached, Alajaji and Campbell 2001) and the
 * Perron root it rests on.
 */
import type { DenseMatrix, Rate, SparseMatrix } from "./types";
import { LN2 } from "./numeric";
import { EngineNumericError } from "./stationary";
import { classify } from "./classify";
import { howardMaxMeanCycle, logGraph } from "./min-entropy";
import { checkDenseNonnegative, checkSparseNonnegative, isSparseMatrix, toSparse } from "./sparse";

/** Result of a Perron-root computation. */
export interface PerronResult {
  /** Natural log of the Perron root. */
  logRoot: number;
  /** The positive right Perron vector (A v = λ v), normalised to sum 1. */
  vector: Float64Array;
  iterations: number;
}

/**
 * Shifted power iteration x ← (B + sI)x / ‖·‖ with s half the current root estimate, so periodic
 * matrices converge too (the shift moves the other peripheral eigenvalues inside the circle).
 * Stops when the Collatz–Wielandt bracket min (Bx)ᵢ/xᵢ ≤ ρ ≤ max (Bx)ᵢ/xᵢ is relatively narrower
 * than tol, or has stopped narrowing below 1e-11 (the floating-point floor for long rows).
 */
function powerPerron(n: number, rowPtr: Int32Array, col: Int32Array, val: Float64Array, tol: number, maxIterations: number): { root: number; vector: Float64Array; iterations: number; converged: boolean; width: number } {
  let x = new Float64Array(n).fill(1);
  let y = new Float64Array(n);
  let shift = 0;
  let bestWidth = Infinity;
  let sinceBest = 0;
  for (let it = 1; it <= maxIterations; it++) {
    let lo = Infinity;
    let hi = 0;
    let big = 0;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) s += val[p] * x[col[p]];
      const r = s / x[i];
      if (r < lo) lo = r;
      if (r > hi) hi = r;
      const yi = s + shift * x[i];
      y[i] = yi;
      if (yi > big) big = yi;
    }
    if (!(hi > 0) || !(big > 0) || !Number.isFinite(big)) throw new EngineNumericError("perronRoot: iterate vanished or overflowed (matrix not irreducible?)");
    const width = (hi - lo) / hi;
    if (width <= tol || (sinceBest > 200 && bestWidth < 1e-11)) {
      const root = 0.5 * (lo + hi);
      let sum = 0;
      for (let i = 0; i < n; i++) sum += x[i];
      const v = new Float64Array(n);
      for (let i = 0; i < n; i++) v[i] = x[i] / sum;
      return { root, vector: v, iterations: it, converged: true, width };
    }
    if (width < bestWidth * (1 - 1e-3)) {
      bestWidth = width;
      sinceBest = 0;
    } else sinceBest++;
    shift = 0.25 * (lo + hi);
    const inv = 1 / big;
    for (let i = 0; i < n; i++) {
      // Keep every component strictly positive so the bracket stays defined (irreducible ⇒ x > 0
      // in exact arithmetic; underflow could create a zero).
      const v = y[i] * inv;
      y[i] = v > 1e-300 ? v : 1e-300;
    }
    [x, y] = [y, x];
  }
  let sum = 0;
  for (let i = 0; i < n; i++) sum += x[i];
  const v = new Float64Array(n);
  for (let i = 0; i < n; i++) v[i] = x[i] / sum;
  return { root: NaN, vector: v, iterations: maxIterations, converged: false, width: bestWidth };
}

/** Largest matrix for the dense Noda fallback (an O(n³) LU per step). */
const NODA_DENSE_LIMIT = 2048;

/** Collatz–Wielandt bounds min/max (Ax)ᵢ/xᵢ of a dense row-major A at a positive x. O(n²). */
function collatzWielandt(n: number, A: Float64Array, x: Float64Array): { lo: number; hi: number } {
  let lo = Infinity;
  let hi = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    const row = i * n;
    for (let j = 0; j < n; j++) s += A[row + j] * x[j];
    const r = s / x[i];
    if (r < lo) lo = r;
    if (r > hi) hi = r;
  }
  return { lo, hi };
}

/**
 * Noda iteration (T. Noda, "Note on the computation of the maximal eigenvalue of a non-negative
 * irreducible matrix", Numer. Math. 17, 1971): inverse iteration with the shift λₖ = max (Axₖ)ᵢ/xₖᵢ,
 * which stays ≥ ρ and converges superlinearly, so nearly decomposable matrices (where power
 * iteration crawls) take a handful of steps. λₖI − A is a nonsingular M-matrix, so elimination
 * without pivoting keeps positive pivots; a non-positive pivot means λₖ has met ρ to rounding.
 * O(n³) per step. Returns null if it cannot make progress (the caller reports the failure).
 */
function nodaPerron(n: number, rowPtr: Int32Array, col: Int32Array, val: Float64Array, start: Float64Array, tol: number): { root: number; vector: Float64Array; iterations: number } | null {
  const A = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) A[i * n + col[p]] += val[p];
  let x = Float64Array.from(start, (v) => (v > 1e-300 ? v : 1e-300));
  let { lo, hi } = collatzWielandt(n, A, x);
  let best = { root: 0.5 * (lo + hi), vector: x, width: (hi - lo) / hi };
  const M = new Float64Array(n * n);
  let steps = 0;
  for (let it = 1; it <= 60; it++) {
    if (best.width <= tol) break;
    steps = it;
    const lambda = hi;
    // M = λI − A, factorised in place (Doolittle, no pivoting), then solve M y = x.
    for (let k = 0; k < n * n; k++) M[k] = -A[k];
    for (let i = 0; i < n; i++) M[i * n + i] += lambda;
    let singular = false;
    for (let k = 0; k < n && !singular; k++) {
      const pivot = M[k * n + k];
      if (!(pivot > 0)) {
        singular = true;
        break;
      }
      for (let i = k + 1; i < n; i++) {
        const f = M[i * n + k] / pivot;
        if (f === 0) continue;
        M[i * n + k] = f;
        const ri = i * n;
        const rk = k * n;
        for (let j = k + 1; j < n; j++) M[ri + j] -= f * M[rk + j];
      }
    }
    if (singular) break;
    const y = Float64Array.from(x);
    for (let i = 0; i < n; i++) {
      let s = y[i];
      for (let j = 0; j < i; j++) s -= M[i * n + j] * y[j];
      y[i] = s;
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = y[i];
      for (let j = i + 1; j < n; j++) s -= M[i * n + j] * y[j];
      y[i] = s / M[i * n + i];
    }
    let sum = 0;
    for (let i = 0; i < n; i++) sum += y[i];
    if (!(sum > 0) || !Number.isFinite(sum)) break;
    for (let i = 0; i < n; i++) y[i] = Math.max(y[i] / sum, 1e-300);
    x = y;
    ({ lo, hi } = collatzWielandt(n, A, x));
    const width = (hi - lo) / hi;
    if (width < best.width) best = { root: 0.5 * (lo + hi), vector: x, width };
    else if (width >= best.width && it > 3) break;
  }
  // The floating-point floor of the bracket for rows of n terms: accept it (common practice, no source).
  if (best.width > Math.max(tol, 64 * n * Number.EPSILON)) return null;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += best.vector[i];
  return { root: best.root, vector: best.vector.map((v) => v / sum), iterations: steps };
}

/**
 * The Perron root by shifted power iteration, falling back to Noda iteration (dense, up to
 * NODA_DENSE_LIMIT states) when the power iteration is slow, as on nearly decomposable matrices.
 * Throws EngineNumericError if neither converges.
 */
function perronCore(n: number, rowPtr: Int32Array, col: Int32Array, val: Float64Array, tol: number, maxIterations: number): { root: number; vector: Float64Array; iterations: number } {
  const quick = powerPerron(n, rowPtr, col, val, tol, n <= NODA_DENSE_LIMIT ? Math.min(maxIterations, 2000) : maxIterations);
  if (quick.converged) return quick;
  if (n <= NODA_DENSE_LIMIT) {
    const noda = nodaPerron(n, rowPtr, col, val, quick.vector, tol);
    if (noda) return { ...noda, iterations: quick.iterations + noda.iterations };
  }
  throw new EngineNumericError(`perronRoot: no convergence to ${tol} in ${quick.iterations} iterations (bracket ${quick.width})`);
}

/**
 * The natural log of the Perron root of a nonnegative irreducible matrix, with its positive
 * right vector, by shifted power iteration with Collatz–Wielandt stopping (relative bracket
 * ≤ tolerance, default 1e-13; maxIterations default 100,000). The matrix is first divided by its
 * largest entry so that huge or tiny entries do not overflow. O(nnz) per iteration.
 * Throws EngineNumericError on a malformed, negative, non-finite, all-zero or reducible matrix,
 * or when the iteration does not converge.
 */
export function perronRoot(A: DenseMatrix | SparseMatrix, opts: { tolerance?: number; maxIterations?: number } = {}): PerronResult {
  if (isSparseMatrix(A)) checkSparseNonnegative(A);
  else checkDenseNonnegative(A);
  const tol = opts.tolerance ?? 1e-13;
  const maxIterations = opts.maxIterations ?? 100_000;
  if (!(tol > 0) || !Number.isFinite(tol)) throw new EngineNumericError(`perronRoot: tolerance must be > 0, got ${tol}`);
  if (!Number.isInteger(maxIterations) || maxIterations < 1) throw new EngineNumericError("perronRoot: maxIterations must be a positive integer");
  const S = toSparse(A);
  let max = 0;
  for (let p = 0; p < S.rowPtr[S.n]; p++) if (S.val[p] > max) max = S.val[p];
  if (!(max > 0)) throw new EngineNumericError("perronRoot: matrix is all zeros");
  const cls = classify(S);
  if (!cls.irreducible) throw new EngineNumericError(`perronRoot: matrix is reducible (${cls.classes.length} classes)`);
  const val = new Float64Array(S.val.length);
  for (let p = 0; p < val.length; p++) val[p] = S.val[p] / max;
  const r = perronCore(S.n, S.rowPtr, S.col, val, tol, maxIterations);
  return { logRoot: Math.log(max) + Math.log(r.root), vector: r.vector, iterations: r.iterations };
}

/**
 * The Rényi entropy rate of order α, (1/(1−α)) log λ(α) with λ(α) the Perron root of [Pᵢⱼ^α]
 * (Rached, Alajaji and Campbell 2001), in bits and nats. To keep [Pᵢⱼ^α] representable for large α,
 * it is replaced by the similar matrix Bᵢⱼ = exp(α(ln Pᵢⱼ − c + x_j − x_i)) where c is the maximum
 * cycle mean of ln P and x its Howard bias: every entry is ≤ 1, the critical cycle's entries are 1,
 * so ρ(B) ∈ [1, n] and log λ(α) = α·c + log ρ(B) with nothing underflowing that matters.
 * Periodic chains work (shifted power iteration). Accuracy: log λ is found to about 1e-13 relative
 * to ρ(B), so the rate carries an absolute error of roughly 1e-13/|1 − α| nats — about 1e-9 at
 * α = 1 ± 1e-4; as α → ∞ it tends to the min-entropy rate. O(nnz) per power iteration plus Howard.
 * Throws EngineNumericError if α is not a finite number > 0 and ≠ 1, or P is malformed or reducible.
 */
export function renyiEntropyRate(P: DenseMatrix | SparseMatrix, alpha: number): Rate {
  if (!Number.isFinite(alpha) || !(alpha > 0) || alpha === 1) {
    throw new EngineNumericError(`renyiEntropyRate: order α must be a finite number > 0 other than 1 (α = 1 is the Shannon rate), got ${alpha}`);
  }
  const G = logGraph(P);
  const cls = classify({ n: G.n, rowPtr: G.rowPtr, col: G.col, val: G.prob });
  if (!cls.irreducible) throw new EngineNumericError(`renyiEntropyRate: chain is reducible (${cls.classes.length} classes); restrict it to a closed class`);
  const n = G.n;
  const h = howardMaxMeanCycle(G);
  const c = h.maxMeanLog;
  const x = h.bias;
  const val = new Float64Array(G.logw.length);
  for (let i = 0; i < n; i++) {
    for (let p = G.rowPtr[i]; p < G.rowPtr[i + 1]; p++) {
      const e = alpha * (G.logw[p] - c + x[G.col[p]] - x[i]);
      val[p] = Math.exp(Math.min(e, 700)); // e ≤ 0 up to rounding; the cap only guards overflow
    }
  }
  const r = perronCore(n, G.rowPtr, G.col, val, 1e-14, 200_000);
  const logLambda = alpha * c + Math.log(r.root);
  let nats = logLambda / (1 - alpha);
  if (!(nats > 0)) nats = 0; // a Rényi rate is ≥ 0; rounding may push it a hair below
  return { bits: nats / LN2, nats };
}
