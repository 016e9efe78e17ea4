/**
 * Rényi entropy rate of an irreducible Markov source (Rached, Alajaji and Campbell 2001) and the
 * Perron root it rests on.
 */
import type { DenseMatrix, Rate, SparseMatrix } from "./types";
import { LN2 } from "./numeric";
import { EngineNumericError } from "./stationary";
import { classify } from "./classify";
import { howardMaxMeanCycle, logGraph, type HowardResult, type LogGraph } from "./min-entropy";
import { checkDenseNonnegative, checkSparseNonnegative, isSparseMatrix, toSparse, transposeSparse } from "./sparse";

function checkBudget(b: number | undefined): number {
  const budget = b ?? PERRON_WORK_BUDGET;
  if (!(budget > 0)) throw new EngineNumericError(`perronRoot: workBudget must be > 0, got ${budget}`);
  return budget;
}

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
 * Default work budget of one Perron-root computation, in entry operations (a power iteration costs
 * n + nnz, a dense Noda step n³/3): about a quarter of a second here. Beyond it the figure is not
 * obtained and the caller leaves it out with a note (never a guess).
 */
export const PERRON_WORK_BUDGET = 2e8;

/**
 * The Perron root by shifted power iteration, falling back to Noda iteration (dense) when the power
 * iteration is slow, as on nearly decomposable matrices, and the O(n³) steps fit the work budget.
 * Throws EngineNumericError if neither converges within maxIterations and the budget.
 */
function perronCore(n: number, rowPtr: Int32Array, col: Int32Array, val: Float64Array, tol: number, maxIterations: number, workBudget: number): { root: number; vector: Float64Array; iterations: number } {
  const perIteration = n + rowPtr[n];
  // Eight Noda steps (each an n³/3 elimination) must fit in what the power phase leaves.
  const nodaCost = 8 * (n * n * n / 3 + 2 * n * n);
  const noda = n <= NODA_DENSE_LIMIT && nodaCost <= workBudget / 2;
  const powerBudget = noda ? workBudget - nodaCost : workBudget;
  const cap = Math.max(1, Math.min(maxIterations, Math.floor(powerBudget / perIteration), noda ? 2000 : Infinity));
  const quick = powerPerron(n, rowPtr, col, val, tol, cap);
  if (quick.converged) return quick;
  if (noda) {
    const r = nodaPerron(n, rowPtr, col, val, quick.vector, tol);
    if (r) return { ...r, iterations: quick.iterations + r.iterations };
  }
  const budgetSpent = cap < maxIterations && !noda;
  throw new EngineNumericError(
    budgetSpent
      ? `perronRoot: the work budget (${workBudget.toExponential(1)} entry operations, ${cap} iterations of ${perIteration}) was spent before the Collatz–Wielandt bracket narrowed to ${tol} (it reached ${quick.width.toExponential(1)})`
      : `perronRoot: no convergence to ${tol} in ${quick.iterations} iterations (bracket ${quick.width})`,
  );
}

/**
 * The natural log of the Perron root of a nonnegative irreducible matrix, with its positive
 * right vector, by shifted power iteration with Collatz–Wielandt stopping (relative bracket
 * ≤ tolerance, default 1e-13; maxIterations default 100,000; workBudget default PERRON_WORK_BUDGET
 * entry operations). The matrix is first divided by its largest entry so that huge or tiny entries
 * do not overflow. O(n + nnz) per iteration, at most workBudget in all.
 * Throws EngineNumericError on a malformed, negative, non-finite, all-zero or reducible matrix,
 * or when the iteration does not converge within the iterations and the budget.
 */
export function perronRoot(A: DenseMatrix | SparseMatrix, opts: { tolerance?: number; maxIterations?: number; workBudget?: number } = {}): PerronResult {
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
  const r = perronCore(S.n, S.rowPtr, S.col, val, tol, maxIterations, checkBudget(opts.workBudget));
  return { logRoot: Math.log(max) + Math.log(r.root), vector: r.vector, iterations: r.iterations };
}

function checkOrder(alpha: number, what: string): void {
  if (!Number.isFinite(alpha) || !(alpha > 0) || alpha === 1) {
    throw new EngineNumericError(`${what}: order α must be a finite number > 0 other than 1 (α = 1 is the Shannon rate), got ${alpha}`);
  }
}

/**
 * What every Rényi order of one chain shares: the log-weight graph, the irreducibility check and
 * Howard's maximum cycle mean with its bias (renyiEntropyRate's rescaling). Computing it once per
 * chain instead of once per order saves a logGraph, a classification and a Howard run per order.
 */
export interface RenyiPreparation {
  graph: LogGraph;
  /** The scaling c and x of Bᵢⱼ = exp(α(ln Pᵢⱼ − c + x_j − x_i)). */
  maxMeanLog: number;
  bias: Float64Array;
  /** Howard's run when the scaling came from it (prepareRenyi); null for prepareRenyiScaled. */
  howard: HowardResult | null;
}

/**
 * The order-independent part of renyiEntropyRate (see RenyiPreparation). O(n + nnz) plus Howard.
 * Throws EngineNumericError if P is malformed or reducible.
 */
export function prepareRenyi(P: DenseMatrix | SparseMatrix): RenyiPreparation {
  const G = irreducibleLogGraph(P);
  const h = howardMaxMeanCycle(G);
  return { graph: G, maxMeanLog: h.maxMeanLog, bias: h.bias, howard: h };
}

function irreducibleLogGraph(P: DenseMatrix | SparseMatrix): LogGraph {
  const G = logGraph(P);
  const cls = classify({ n: G.n, rowPtr: G.rowPtr, col: G.col, val: G.prob });
  if (!cls.irreducible) throw new EngineNumericError(`renyiEntropyRate: chain is reducible (${cls.classes.length} classes); restrict it to a closed class`);
  return G;
}

/**
 * prepareRenyi with a scaling bias x supplied instead of Howard's: c is then taken as the largest
 * ln Pᵢⱼ + x_j − x_i, so every entry of B is ≤ 1 and the largest is 1. Any x gives the same Perron
 * root (B is similar to [Pᵢⱼ^α] times e^{−αc}); a good one keeps B's entries near 1. For a
 * reversible chain x = −½ ln μ makes B symmetric, Bᵢⱼ = (PᵢⱼPⱼᵢ)^{α/2}/max, with no Howard run.
 * O(n + nnz). Throws EngineNumericError if P is malformed or reducible, or x has the wrong length
 * or a non-finite entry.
 */
export function prepareRenyiScaled(P: DenseMatrix | SparseMatrix, bias: ArrayLike<number>): RenyiPreparation {
  const G = irreducibleLogGraph(P);
  if (bias.length !== G.n) throw new EngineNumericError(`prepareRenyiScaled: bias has ${bias.length} entries, P has ${G.n} states`);
  const x = Float64Array.from(bias);
  let c = -Infinity;
  for (let i = 0; i < G.n; i++) {
    if (!Number.isFinite(x[i])) throw new EngineNumericError(`prepareRenyiScaled: bias[${i}] = ${x[i]} is not finite`);
    for (let p = G.rowPtr[i]; p < G.rowPtr[i + 1]; p++) {
      const e = G.logw[p] + x[G.col[p]] - x[i];
      if (e > c) c = e;
    }
  }
  return { graph: G, maxMeanLog: c, bias: x, howard: null };
}

/**
 * The Rényi entropy rate of order α, (1/(1−α)) log λ(α) with λ(α) the Perron root of [Pᵢⱼ^α]
 * (Rached, Alajaji and Campbell 2001), in bits and nats. To keep [Pᵢⱼ^α] representable for large α,
 * it is replaced by the similar matrix Bᵢⱼ = exp(α(ln Pᵢⱼ − c + x_j − x_i)) where c is the maximum
 * cycle mean of ln P and x its Howard bias: every entry is ≤ 1, the critical cycle's entries are 1,
 * so ρ(B) ∈ [1, n] and log λ(α) = α·c + log ρ(B) with nothing underflowing that matters.
 * Periodic chains work (shifted power iteration). Accuracy: log λ is found to about 1e-13 relative
 * to ρ(B), so the rate carries an absolute error of roughly 1e-13/|1 − α| nats — about 1e-9 at
 * α = 1 ± 1e-4; as α → ∞ it tends to the min-entropy rate. O(nnz) per power iteration plus Howard,
 * at most opts.workBudget (default PERRON_WORK_BUDGET) entry operations for the Perron root.
 * `P` may be a RenyiPreparation from prepareRenyi (several orders of one chain share it).
 * Throws EngineNumericError if α is not a finite number > 0 and ≠ 1, P is malformed or reducible,
 * or the Perron root is not obtained within the budget (the message says so).
 */
export function renyiEntropyRate(P: DenseMatrix | SparseMatrix | RenyiPreparation, alpha: number, opts: { workBudget?: number } = {}): Rate {
  checkOrder(alpha, "renyiEntropyRate");
  const prep = "graph" in P ? P : prepareRenyi(P);
  const G = prep.graph;
  const n = G.n;
  const c = prep.maxMeanLog;
  const x = prep.bias;
  const val = new Float64Array(G.logw.length);
  for (let i = 0; i < n; i++) {
    for (let p = G.rowPtr[i]; p < G.rowPtr[i + 1]; p++) {
      const e = alpha * (G.logw[p] - c + x[G.col[p]] - x[i]);
      val[p] = Math.exp(Math.min(e, 700)); // e ≤ 0 up to rounding; the cap only guards overflow
    }
  }
  const r = perronCore(n, G.rowPtr, G.col, val, 1e-14, 200_000, checkBudget(opts.workBudget));
  const logLambda = alpha * c + Math.log(r.root);
  let nats = logLambda / (1 - alpha);
  if (!(nats > 0)) nats = 0; // a Rényi rate is ≥ 0; rounding may push it a hair below
  return { bits: nats / LN2, nats };
}

/** Eigenvalues and vectors of a small dense symmetric matrix by cyclic Jacobi rotations (Jacobi 1846). O(m³) per sweep. */
function jacobiEigen(m: number, a: Float64Array): { values: Float64Array; vectors: Float64Array } {
  const v = new Float64Array(m * m);
  for (let i = 0; i < m; i++) v[i * m + i] = 1;
  for (let sweep = 0; sweep < 60; sweep++) {
    let off = 0;
    for (let i = 0; i < m; i++) for (let j = i + 1; j < m; j++) off += a[i * m + j] ** 2;
    if (off < 1e-300) break;
    for (let p = 0; p < m; p++) {
      for (let q = p + 1; q < m; q++) {
        const apq = a[p * m + q];
        if (Math.abs(apq) < 1e-300) continue;
        const theta = (a[q * m + q] - a[p * m + p]) / (2 * apq);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < m; k++) {
          const akp = a[k * m + p];
          const akq = a[k * m + q];
          a[k * m + p] = c * akp - s * akq;
          a[k * m + q] = s * akp + c * akq;
        }
        for (let k = 0; k < m; k++) {
          const apk = a[p * m + k];
          const aqk = a[q * m + k];
          a[p * m + k] = c * apk - s * aqk;
          a[q * m + k] = s * apk + c * aqk;
        }
        for (let k = 0; k < m; k++) {
          const vkp = v[k * m + p];
          const vkq = v[k * m + q];
          v[k * m + p] = c * vkp - s * vkq;
          v[k * m + q] = s * vkp + c * vkq;
        }
      }
    }
  }
  const values = new Float64Array(m);
  for (let i = 0; i < m; i++) values[i] = a[i * m + i];
  return { values, vectors: v };
}

function csrApply(n: number, rowPtr: Int32Array, col: Int32Array, val: Float64Array, x: Float64Array, y: Float64Array): void {
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) s += val[p] * x[col[p]];
    y[i] = s;
  }
}

/** A bracket of a Perron root with the vector it came from. */
interface PerronBracket {
  lower: number;
  upper: number;
  vector: Float64Array;
  work: number;
}

/**
 * The Perron root of a symmetric nonnegative CSR matrix by explicitly restarted Lanczos with full
 * reorthogonalisation (Lanczos 1950; restarts from the Ritz vector), which converges at a rate
 * governed by the square root of the spectral gap instead of the gap itself. Returns a rigorous
 * bracket from the final positive vector x = |Ritz vector|: lower = max(Rayleigh quotient xᵀSx/xᵀx
 * (valid for any x because S is symmetric), min (Sx)ᵢ/xᵢ), upper = max (Sx)ᵢ/xᵢ (Collatz–Wielandt).
 * Stops when the bracket is relatively narrower than tol or the work budget is spent.
 * O((n + nnz)·m + n·m²) per restart with m = min(n, 24) basis vectors.
 */
const POLISH_STEPS = 4;

function lanczosPerron(n: number, rowPtr: Int32Array, col: Int32Array, val: Float64Array, tol: number, workBudget: number): PerronBracket {
  const m = Math.min(n, 24);
  const perMatvec = n + rowPtr[n];
  const basis = Array.from({ length: m + 1 }, () => new Float64Array(n));
  const w = new Float64Array(n);
  let x = new Float64Array(n).fill(1 / Math.sqrt(n));
  let work = 0;
  let best: PerronBracket = { lower: 0, upper: Infinity, vector: new Float64Array(n).fill(1 / n), work: 0 };
  const bracketOf = (y: Float64Array): void => {
    const pos = new Float64Array(n);
    let big = 0;
    for (let i = 0; i < n; i++) big = Math.max(big, Math.abs(y[i]));
    for (let i = 0; i < n; i++) pos[i] = Math.max(Math.abs(y[i]) / big, 1e-300);
    // A few plain power steps: sums of positive terms without cancellation restore the relative
    // accuracy of small components, which the Collatz–Wielandt maximum is sensitive to.
    for (let t = 0; t < POLISH_STEPS; t++) {
      csrApply(n, rowPtr, col, val, pos, w);
      let mx = 0;
      for (let i = 0; i < n; i++) mx = Math.max(mx, w[i]);
      for (let i = 0; i < n; i++) pos[i] = Math.max(w[i] / mx, 1e-300);
    }
    csrApply(n, rowPtr, col, val, pos, w);
    work += (POLISH_STEPS + 1) * perMatvec;
    let lo = Infinity;
    let hi = 0;
    let num = 0;
    let den = 0;
    for (let i = 0; i < n; i++) {
      const r = w[i] / pos[i];
      if (r < lo) lo = r;
      if (r > hi) hi = r;
      num += pos[i] * w[i];
      den += pos[i] * pos[i];
    }
    const lower = Math.max(lo, num / den);
    const upper = Math.min(hi, best.upper);
    if (upper - lower < best.upper - best.lower || best.upper === Infinity) {
      let s = 0;
      for (let i = 0; i < n; i++) s += pos[i];
      best = { lower: Math.max(lower, best.lower), upper, vector: pos.map((v) => v / s), work };
    } else best = { ...best, lower: Math.max(best.lower, lower), upper };
  };
  for (let restart = 0; restart < 1000; restart++) {
    const cycleCost = m * perMatvec + m * m * n + m * n + (POLISH_STEPS + 1) * perMatvec;
    if (work + cycleCost > workBudget) break;
    const alpha = new Float64Array(m);
    const beta = new Float64Array(m);
    basis[0].set(x);
    let k = 0;
    for (; k < m; k++) {
      const v = basis[k];
      csrApply(n, rowPtr, col, val, v, w);
      let a = 0;
      for (let i = 0; i < n; i++) a += v[i] * w[i];
      alpha[k] = a;
      // Full reorthogonalisation against every basis vector so far (classical Gram–Schmidt).
      for (let j = 0; j <= k; j++) {
        const b = basis[j];
        let d = 0;
        for (let i = 0; i < n; i++) d += b[i] * w[i];
        for (let i = 0; i < n; i++) w[i] -= d * b[i];
      }
      let norm = 0;
      for (let i = 0; i < n; i++) norm += w[i] * w[i];
      norm = Math.sqrt(norm);
      beta[k] = norm;
      if (!(norm > 1e-14 * Math.abs(a)) || k + 1 === m) {
        k++;
        break;
      }
      const next = basis[k + 1];
      for (let i = 0; i < n; i++) next[i] = w[i] / norm;
    }
    work += k * perMatvec + k * k * n + k * n;
    const T = new Float64Array(k * k);
    for (let i = 0; i < k; i++) {
      T[i * k + i] = alpha[i];
      if (i + 1 < k) T[i * k + i + 1] = T[(i + 1) * k + i] = beta[i];
    }
    const { values, vectors } = jacobiEigen(k, T);
    let top = 0;
    for (let i = 1; i < k; i++) if (values[i] > values[top]) top = i;
    const y = new Float64Array(n);
    for (let j = 0; j < k; j++) {
      const c = vectors[j * k + top];
      const b = basis[j];
      for (let i = 0; i < n; i++) y[i] += c * b[i];
    }
    let sum = 0;
    for (let i = 0; i < n; i++) sum += y[i];
    if (sum < 0) for (let i = 0; i < n; i++) y[i] = -y[i];
    bracketOf(y);
    if (best.upper - best.lower <= tol * best.upper) break;
    let norm = 0;
    for (let i = 0; i < n; i++) norm += y[i] * y[i];
    norm = Math.sqrt(norm);
    x = y.map((v) => v / norm);
  }
  return { ...best, work };
}

/** Relative width of the Perron-root bracket below which a reversible chain's Rényi rate is published. */
export const REVERSIBLE_BRACKET_TOLERANCE = 1e-10;

/** Work (entry operations) of one lanczosPerron restart on n states and nnz entries, as it counts it. */
function lanczosRestartCost(n: number, nnz: number): number {
  const m = Math.min(n, 24);
  const perMatvec = n + nnz;
  return m * perMatvec + m * m * n + m * n + (POLISH_STEPS + 1) * perMatvec;
}

/**
 * The order-independent part of reversibleRenyiEntropyRate: the positive pattern of P (checked to be
 * symmetric and irreducible) and ½(ln Pᵢⱼ + ln Pⱼᵢ) per entry, so that ln Sᵢⱼ = α times it.
 */
export interface ReversibleRenyiPreparation {
  n: number;
  rowPtr: Int32Array;
  col: Int32Array;
  /** ½(ln Pᵢⱼ + ln Pⱼᵢ), aligned with col. */
  halfLogS: Float64Array;
}

/**
 * Builds a ReversibleRenyiPreparation. O(n + nnz). Throws EngineNumericError if P is malformed, its
 * transition graph is not symmetric, or it is reducible.
 */
export function prepareReversibleRenyi(P: DenseMatrix | SparseMatrix): ReversibleRenyiPreparation {
  const G = logGraph(P);
  const n = G.n;
  const cls = classify({ n, rowPtr: G.rowPtr, col: G.col, val: G.prob });
  if (!cls.irreducible) throw new EngineNumericError(`reversibleRenyiEntropyRate: chain is reducible (${cls.classes.length} classes)`);
  const T = transposeSparse({ n, rowPtr: G.rowPtr, col: G.col, val: G.logw });
  for (let i = 0; i <= n; i++) if (T.rowPtr[i] !== G.rowPtr[i]) throw new EngineNumericError("reversibleRenyiEntropyRate: the transition graph is not symmetric, so the chain is not reversible");
  const halfLogS = new Float64Array(G.logw.length);
  for (let p = 0; p < halfLogS.length; p++) {
    if (T.col[p] !== G.col[p]) throw new EngineNumericError("reversibleRenyiEntropyRate: the transition graph is not symmetric, so the chain is not reversible");
    halfLogS[p] = 0.5 * (G.logw[p] + T.val[p]);
  }
  return { n, rowPtr: G.rowPtr, col: G.col, halfLogS };
}

function positiveEntries(P: DenseMatrix | SparseMatrix): number {
  let nnz = 0;
  if (isSparseMatrix(P)) {
    for (let p = 0; p < P.rowPtr[P.n]; p++) if (P.val[p] > 0) nnz++;
  } else for (let k = 0; k < P.data.length; k++) if (P.data[k] > 0) nnz++;
  return nnz;
}

/**
 * The Rényi entropy rate of order α of a reversible chain (for example a random walk on an
 * undirected weighted graph), from the symmetric matrix Sᵢⱼ = (Pᵢⱼ Pⱼᵢ)^{α/2}: reversibility
 * μᵢPᵢⱼ = μⱼPⱼᵢ makes S = D^{α/2}[Pᵢⱼ^α]D^{−α/2} with D = diag(μ), so both have the same Perron root
 * λ(α), and the rate is (1/(1−α)) log λ(α) (Rached, Alajaji and Campbell 2001). S is scaled by its
 * largest entry (so large α does not underflow; ρ(S) is at least that entry) and its Perron root
 * found by restarted Lanczos with a Rayleigh/Collatz–Wielandt bracket (lanczosPerron). The figure
 * is returned only when the bracket is relatively narrower than 1e-10 (REVERSIBLE_BRACKET_TOLERANCE,
 * an error of at most 1e-10/|1 − α| nats in the rate) within the work budget
 * (default PERRON_WORK_BUDGET); `bracketBits` carries the bracket as a rate interval. When the
 * budget does not cover a single restart it throws at once, before any preparation.
 * `P` may be a ReversibleRenyiPreparation (several orders of one chain share it).
 * O((n + nnz)·24 + 24²·n) per restart. Throws EngineNumericError if α is not a finite number > 0 and
 * ≠ 1, P is malformed, not structurally symmetric (so it cannot be reversible) or reducible, or the
 * bracket does not narrow within the budget (the message says so). Reversibility itself is not
 * checked here: verification recomputes the rate from [Pᵢⱼ^α] directly.
 */
export function reversibleRenyiEntropyRate(
  P: DenseMatrix | SparseMatrix | ReversibleRenyiPreparation,
  alpha: number,
  opts: { workBudget?: number } = {},
): Rate & { bracketBits: [number, number] } {
  if (!Number.isFinite(alpha) || !(alpha > 0) || alpha === 1) {
    throw new EngineNumericError(`reversibleRenyiEntropyRate: order α must be a finite number > 0 other than 1, got ${alpha}`);
  }
  const budget = checkBudget(opts.workBudget);
  let prep: ReversibleRenyiPreparation;
  if ("halfLogS" in P) prep = P;
  else {
    if (isSparseMatrix(P)) checkSparseNonnegative(P, "transition matrix");
    else checkDenseNonnegative(P, "transition matrix");
    reversibleBudgetCheck(P.n, positiveEntries(P), budget);
    prep = prepareReversibleRenyi(P);
  }
  const n = prep.n;
  reversibleBudgetCheck(n, prep.halfLogS.length, budget);
  const logS = new Float64Array(prep.halfLogS.length);
  let top = -Infinity;
  for (let p = 0; p < logS.length; p++) {
    logS[p] = alpha * prep.halfLogS[p];
    if (logS[p] > top) top = logS[p];
  }
  const val = Float64Array.from(logS, (l) => Math.exp(l - top));
  const tol = REVERSIBLE_BRACKET_TOLERANCE;
  const b = n === 1 ? { lower: val[0], upper: val[0], vector: new Float64Array([1]), work: 0 } : lanczosPerron(n, prep.rowPtr, prep.col, val, tol, budget);
  if (!(b.upper - b.lower <= tol * b.upper) || !(b.lower > 0)) {
    throw new EngineNumericError(
      `reversibleRenyiEntropyRate: the work budget (${budget.toExponential(1)} entry operations) was spent before the Perron-root bracket narrowed to ${tol} (it reached ${((b.upper - b.lower) / b.upper).toExponential(1)})`,
    );
  }
  const toBits = (root: number) => {
    const nats = (top + Math.log(root)) / (1 - alpha);
    return nats / LN2;
  };
  const mid = 0.5 * (b.lower + b.upper);
  let nats = (top + Math.log(mid)) / (1 - alpha);
  if (!(nats > 0)) nats = 0;
  const [x, y] = [toBits(b.lower), toBits(b.upper)];
  return { bits: nats / LN2, nats, bracketBits: x <= y ? [x, y] : [y, x] };
}

/**
 * Whether a work budget pays for at least one Lanczos restart of reversibleRenyiEntropyRate on P
 * (otherwise it would throw at once). O(nnz) to count P's positive entries. Never throws.
 */
export function reversibleRenyiFitsBudget(P: DenseMatrix | SparseMatrix, budget: number): boolean {
  return P.n === 1 || lanczosRestartCost(P.n, positiveEntries(P)) <= budget;
}

/** Throws when the budget cannot pay for one Lanczos restart (nothing could be published). */
function reversibleBudgetCheck(n: number, nnz: number, budget: number): void {
  if (n === 1) return;
  const cost = lanczosRestartCost(n, nnz);
  if (cost > budget) {
    throw new EngineNumericError(
      `reversibleRenyiEntropyRate: the work budget (${budget.toExponential(1)} entry operations) is smaller than one Lanczos restart on ${n} states (${cost.toExponential(1)})`,
    );
  }
}
