/**
 * Stationary distributions: GTH state reduction for dense chains, Gauss–Seidel for large sparse ones.
 */
import type { DenseMatrix, SparseMatrix } from "./types";
import { Accumulator } from "./numeric";
import { EngineNumericError, checkDenseNonnegative, checkSparseNonnegative, isSparseMatrix, transposeSparse } from "./sparse";
import { classify } from "./classify";
import { gthWorkspace, type Deferred4 } from "./wasm/gth-kernel";

/** A numerical precondition failed (reducible chain, bad shape, non-finite entry, α = 1 …). */
export { EngineNumericError };

function describeReducible(P: DenseMatrix | SparseMatrix): string {
  const c = classify(P);
  const closed = c.closedClasses.map((k) => `{${c.classes[k].slice(0, 5).join(", ")}${c.classes[k].length > 5 ? ", …" : ""}}`);
  return `chain is reducible: ${c.classes.length} communicating classes, closed: ${closed.join(" ")}`;
}

function gthFailure(P: DenseMatrix): EngineNumericError {
  const c = classify(P);
  if (!c.irreducible) return new EngineNumericError(`stationaryGTH: ${describeReducible(P)}`);
  return new EngineNumericError("stationaryGTH: a stationary probability underflowed to 0 (entries too small for double precision)");
}

// Panel width of the blocked elimination: the deferred update of the leading block then touches
// each of its rows once per panel instead of once per state (cache blocking, as in blocked LU).
const GTH_PANEL = 32;

// From this many states on, the deferred update runs in the WebAssembly kernel when available.
const GTH_KERNEL_MIN = 128;

/** GTH panel columns of one leading row (offset ri): scale a_ik by the pivot's 1/s and spread it over the panel columns below k. */
function gthPanelColumns(a: Float64Array, n: number, ri: number, top: number, k0: number, inv: Float64Array): void {
  for (let k = top; k >= k0; k--) {
    const f = (a[ri + k] *= inv[top - k]);
    if (f === 0 || k === k0) continue;
    const rk = k * n;
    for (let j = k0; j < k; j++) a[ri + j] += f * a[rk + j];
  }
}

/** Deferred GTH update of four consecutive leading rows (offset r0) over the columns j < k0, four panel rows at a time. */
function gthDeferred4(a: Float64Array, n: number, r0: number, top: number, k0: number, kernel: Deferred4 | null): void {
  const r1 = r0 + n;
  const r2 = r1 + n;
  const r3 = r2 + n;
  let k = top;
  if (kernel) {
    // The same sums in WebAssembly SIMD (wasm/gth-kernel.wat), two columns per instruction.
    const n8 = 8 * n;
    for (; k - 3 >= k0; k -= 4) {
      kernel(8 * r0, k * n8, n8, k0,
        a[r0 + k], a[r0 + k - 1], a[r0 + k - 2], a[r0 + k - 3],
        a[r1 + k], a[r1 + k - 1], a[r1 + k - 2], a[r1 + k - 3],
        a[r2 + k], a[r2 + k - 1], a[r2 + k - 2], a[r2 + k - 3],
        a[r3 + k], a[r3 + k - 1], a[r3 + k - 2], a[r3 + k - 3]);
    }
  }
  for (; k - 3 >= k0; k -= 4) {
    const f0 = a[r0 + k], f1 = a[r0 + k - 1], f2 = a[r0 + k - 2], f3 = a[r0 + k - 3];
    const g0 = a[r1 + k], g1 = a[r1 + k - 1], g2 = a[r1 + k - 2], g3 = a[r1 + k - 3];
    const h0 = a[r2 + k], h1 = a[r2 + k - 1], h2 = a[r2 + k - 2], h3 = a[r2 + k - 3];
    const m0 = a[r3 + k], m1 = a[r3 + k - 1], m2 = a[r3 + k - 2], m3 = a[r3 + k - 3];
    const p0 = k * n;
    const p1 = p0 - n;
    const p2 = p1 - n;
    const p3 = p2 - n;
    for (let j = 0; j < k0; j++) {
      const x0 = a[p0 + j];
      const x1 = a[p1 + j];
      const x2 = a[p2 + j];
      const x3 = a[p3 + j];
      a[r0 + j] += f0 * x0 + f1 * x1 + f2 * x2 + f3 * x3;
      a[r1 + j] += g0 * x0 + g1 * x1 + g2 * x2 + g3 * x3;
      a[r2 + j] += h0 * x0 + h1 * x1 + h2 * x2 + h3 * x3;
      a[r3 + j] += m0 * x0 + m1 * x1 + m2 * x2 + m3 * x3;
    }
  }
  for (; k >= k0; k--) {
    const f0 = a[r0 + k], f1 = a[r1 + k], f2 = a[r2 + k], f3 = a[r3 + k];
    const pk = k * n;
    for (let j = 0; j < k0; j++) {
      const x = a[pk + j];
      a[r0 + j] += f0 * x;
      a[r1 + j] += f1 * x;
      a[r2 + j] += f2 * x;
      a[r3 + j] += f3 * x;
    }
  }
}

/** Deferred GTH update of one leading row (offset ri) over the columns j < k0. */
function gthDeferred1(a: Float64Array, n: number, ri: number, top: number, k0: number): void {
  for (let k = top; k >= k0; k--) {
    const f = a[ri + k];
    if (f === 0) continue;
    const rk = k * n;
    for (let j = 0; j < k0; j++) a[ri + j] += f * a[rk + j];
  }
}

/**
 * The stationary distribution of an irreducible chain by GTH state reduction (Grassmann, Taksar
 * and Heyman 1985): states are eliminated one by one, the pivot is the off-diagonal row sum and no
 * subtraction occurs, so every component keeps nearly full relative accuracy even on nearly
 * decomposable chains (O'Cinneide 1993). The diagonal of P is not used (rows are taken to sum to 1).
 * `order: "reverse"` eliminates in the opposite order, an independent second route.
 * O(n³/3) time, one n² Float64Array copy; the elimination is blocked in panels for cache reuse.
 * Throws EngineNumericError if P is malformed, has a negative or non-finite entry, or is reducible.
 */
export function stationaryGTH(P: DenseMatrix, opts: { order?: "forward" | "reverse"; kernel?: "auto" | "js" } = {}): Float64Array {
  checkDenseNonnegative(P, "transition matrix");
  const n = P.n;
  if (n === 1) return new Float64Array([1]);
  // No separate irreducibility pass: structural zeros stay exact zeros under GTH, so a reducible
  // chain shows up as a vanishing pivot or a zero component (then classify names the classes).
  const reverse = opts.order === "reverse";
  // Small chains stay in JavaScript (the kernel's set-up would cost more than it saves).
  const { a, deferred4 } = gthWorkspace(n * n, opts.kernel !== "js" && n >= GTH_KERNEL_MIN);
  if (reverse) {
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a[i * n + j] = P.data[(n - 1 - i) * n + (n - 1 - j)];
  } else a.set(P.data);

  const inv = new Float64Array(GTH_PANEL);
  for (let top = n - 1; top >= 1; top -= GTH_PANEL) {
    const k0 = Math.max(1, top - GTH_PANEL + 1);
    // Panel: eliminate states top … k0 among the panel rows, each over its full prefix j < k.
    for (let k = top; k >= k0; k--) {
      const rk = k * n;
      let s = 0;
      for (let j = 0; j < k; j++) s += a[rk + j];
      if (!(s > 0)) throw gthFailure(P);
      const v = 1 / s;
      inv[top - k] = v;
      for (let i = k0; i < k; i++) {
        const ri = i * n;
        const f = (a[ri + k] *= v);
        if (f === 0) continue;
        for (let j = 0; j < k; j++) a[ri + j] += f * a[rk + j];
      }
    }
    // Leading rows i < k0, four at a time: first the panel columns, row by row in pivot order (each
    // row's panel part depends only on itself and the panel rows), then the deferred update
    // A11 += A12 · A21, four panel rows at a time (register blocking; each leading row is read and
    // written once per panel).
    let i = 0;
    for (; i + 3 < k0; i += 4) {
      gthPanelColumns(a, n, i * n, top, k0, inv);
      gthPanelColumns(a, n, (i + 1) * n, top, k0, inv);
      gthPanelColumns(a, n, (i + 2) * n, top, k0, inv);
      gthPanelColumns(a, n, (i + 3) * n, top, k0, inv);
      gthDeferred4(a, n, i * n, top, k0, deferred4);
    }
    for (; i < k0; i++) {
      gthPanelColumns(a, n, i * n, top, k0, inv);
      gthDeferred1(a, n, i * n, top, k0);
    }
  }
  // Back substitution x₀ = 1, x_k = Σ_{i<k} x_i a_ik, row by row: once x_i is complete it is added
  // into every later x_k (reads each row of a contiguously instead of each column with stride n).
  const x = new Float64Array(n);
  x[0] = 1;
  for (let i = 0; i < n - 1; i++) {
    const xi = x[i];
    const ri = i * n;
    for (let k = i + 1; k < n; k++) x[k] += xi * a[ri + k];
  }
  const acc = new Accumulator();
  for (let i = 0; i < n; i++) acc.add(x[i]);
  const total = acc.value();
  if (!(total > 0) || !Number.isFinite(total)) throw new EngineNumericError("stationaryGTH: normalisation failed (overflow)");
  const mu = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    if (!(x[i] > 0)) throw gthFailure(P);
    mu[reverse ? n - 1 - i : i] = x[i] / total;
  }
  return mu;
}

/**
 * ‖μP − μ‖₁ for a (not necessarily normalised) vector μ. O(n²) dense, O(n + nnz) sparse; the
 * sum of absolute differences is compensated. Throws EngineNumericError if μ has the wrong length.
 */
export function stationaryResidual(P: DenseMatrix | SparseMatrix, mu: ArrayLike<number>): number {
  const n = P.n;
  if (mu.length !== n) throw new EngineNumericError(`stationaryResidual: μ has ${mu.length} entries, P has ${n} states`);
  const y = new Float64Array(n);
  if (isSparseMatrix(P)) {
    for (let i = 0; i < n; i++) {
      const m = mu[i];
      if (m === 0) continue;
      for (let p = P.rowPtr[i]; p < P.rowPtr[i + 1]; p++) y[P.col[p]] += m * P.val[p];
    }
  } else {
    const d = P.data;
    for (let i = 0; i < n; i++) {
      const m = mu[i];
      if (m === 0) continue;
      const r = i * n;
      for (let j = 0; j < n; j++) y[j] += m * d[r + j];
    }
  }
  const acc = new Accumulator();
  for (let j = 0; j < n; j++) acc.add(Math.abs(y[j] - mu[j]));
  const r = acc.value();
  if (Number.isNaN(r)) throw new EngineNumericError("stationaryResidual: μ or P holds a non-finite value");
  return r;
}

/** One level of the multilevel solver: Pᵀ (column access) and the off-diagonal row sums of P. */
interface Level {
  T: SparseMatrix;
  out: Float64Array;
}

// Chains this small are solved directly (GTH) at the bottom of a V-cycle.
const COARSEST = 256;

/** One forward and one backward Gauss–Seidel sweep on μ(I − P) = 0, in place. O(nnz). */
function symmetricGaussSeidel(L: Level, mu: Float64Array): void {
  const { rowPtr, col, val, n } = L.T;
  const out = L.out;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let p = rowPtr[j]; p < rowPtr[j + 1]; p++) {
      const i = col[p];
      if (i !== j) s += mu[i] * val[p];
    }
    mu[j] = s / out[j];
  }
  for (let j = n - 1; j >= 0; j--) {
    let s = 0;
    for (let p = rowPtr[j]; p < rowPtr[j + 1]; p++) {
      const i = col[p];
      if (i !== j) s += mu[i] * val[p];
    }
    mu[j] = s / out[j];
  }
}

/**
 * Aggregates states in consecutive pairs {2I, 2I+1} with weights μᵢ/μ_I:
 * Q_IJ = Σ_{i∈I} (μᵢ/μ_I) Σ_{j∈J} Pᵢⱼ, built directly in transposed form from Pᵀ. O(nnz).
 */
function coarsen(L: Level, mu: Float64Array): { level: Level; muCoarse: Float64Array } {
  const { rowPtr, col, val, n } = L.T;
  const nc = (n + 1) >> 1;
  const muC = new Float64Array(nc);
  for (let i = 0; i < n; i++) muC[i >> 1] += mu[i];
  const weight = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const m = muC[i >> 1];
    weight[i] = m > 0 ? mu[i] / m : (i | 1) < n ? 0.5 : 1; // equal shares if the aggregate has no mass
  }
  const cPtr = new Int32Array(nc + 1);
  const cCol = new Int32Array(rowPtr[n]);
  const cVal = new Float64Array(rowPtr[n]);
  const markRow = new Int32Array(nc).fill(-1);
  const markPos = new Int32Array(nc);
  let q = 0;
  for (let J = 0; J < nc; J++) {
    for (let j = 2 * J; j < Math.min(2 * J + 2, n); j++) {
      for (let p = rowPtr[j]; p < rowPtr[j + 1]; p++) {
        const i = col[p];
        const I = i >> 1;
        const x = weight[i] * val[p];
        if (markRow[I] === J) cVal[markPos[I]] += x;
        else {
          markRow[I] = J;
          markPos[I] = q;
          cCol[q] = I;
          cVal[q] = x;
          q++;
        }
      }
    }
    cPtr[J + 1] = q;
  }
  const out = new Float64Array(nc);
  for (let J = 0; J < nc; J++) for (let p = cPtr[J]; p < cPtr[J + 1]; p++) if (cCol[p] !== J) out[cCol[p]] += cVal[p];
  return { level: { T: { n: nc, rowPtr: cPtr, col: cCol.slice(0, q), val: cVal.slice(0, q) }, out }, muCoarse: muC };
}

/**
 * One multilevel aggregation–disaggregation V-cycle (Horton and Leutenegger 1994): smooth with
 * Gauss–Seidel, aggregate pairs of neighbouring states, solve the aggregated chain recursively
 * (GTH at the bottom), rescale μ within each aggregate to the coarse solution, smooth again.
 * Pairing by index suits chains whose nearby indices are coupled (rings, banded, birth–death);
 * on other chains Gauss–Seidel alone already converges fast. O(nnz) per level.
 */
function vCycle(L: Level, mu: Float64Array): void {
  const n = L.T.n;
  symmetricGaussSeidel(L, mu);
  if (n <= COARSEST) {
    // Direct solve of the small chain (rows of P from the columns held in Pᵀ; diagonal unused).
    const d = new Float64Array(n * n);
    for (let j = 0; j < n; j++) for (let p = L.T.rowPtr[j]; p < L.T.rowPtr[j + 1]; p++) d[L.T.col[p] * n + j] += L.T.val[p];
    let exact: Float64Array | null = null;
    try {
      exact = stationaryGTH({ n, data: d });
    } catch {
      exact = null; // underflowed weights can cut an edge; smoothing alone then has to do
    }
    if (exact) {
      let s = 0;
      for (let i = 0; i < n; i++) s += mu[i];
      for (let i = 0; i < n; i++) mu[i] = exact[i] * s;
    } else for (let t = 0; t < 20; t++) symmetricGaussSeidel(L, mu);
    return;
  }
  const { level, muCoarse } = coarsen(L, mu);
  const before = Float64Array.from(muCoarse);
  for (let I = 0; I < level.T.n; I++) {
    if (!(level.out[I] > 0)) {
      // An aggregate with no way out at this level (cut by underflow): skip the correction.
      symmetricGaussSeidel(L, mu);
      return;
    }
  }
  vCycle(level, muCoarse);
  for (let i = 0; i < n; i++) {
    const b = before[i >> 1];
    if (b > 0) mu[i] *= muCoarse[i >> 1] / b;
    else mu[i] = muCoarse[i >> 1] / ((i >> 1) * 2 + 1 < n ? 2 : 1);
  }
  symmetricGaussSeidel(L, mu);
}

/**
 * GTH state reduction on sparse storage, eliminating states n−1, n−2, …, 1 (Grassmann, Taksar and
 * Heyman 1985). Cheap when elimination creates little fill (rings, paths, banded chains); gives up
 * and returns null once more than maxFill entries would be stored, once maxWork entry updates have
 * been made (on a well-connected chain the fill, and the cost of each elimination, grows fast long
 * before maxFill is reached), or when a pivot vanishes. O(min(maxWork, Σ_k |in(k)|·|out(k)|)) time.
 */
function sparseGTH(P: SparseMatrix, maxFill: number, maxWork: number): Float64Array | null {
  const n = P.n;
  const rows: Map<number, number>[] = new Array(n);
  const ins: Set<number>[] = new Array(n);
  for (let i = 0; i < n; i++) {
    rows[i] = new Map();
    ins[i] = new Set();
  }
  let stored = 0;
  for (let i = 0; i < n; i++) {
    const r = rows[i];
    for (let p = P.rowPtr[i]; p < P.rowPtr[i + 1]; p++) {
      const j = P.col[p];
      const v = P.val[p];
      if (j === i || !(v > 0)) continue; // the diagonal is never needed
      const old = r.get(j);
      if (old === undefined) {
        r.set(j, v);
        ins[j].add(i);
        stored++;
      } else r.set(j, old + v);
    }
  }
  const limit = stored + maxFill;
  // Saved scaled columns for the back substitution: for state k, pairs (i, a_ik / s_k).
  const savedStart = new Int32Array(n);
  const savedEnd = new Int32Array(n);
  const savedI: number[] = [];
  const savedF: number[] = [];
  let work = 0;
  for (let k = n - 1; k >= 1; k--) {
    const rk = rows[k];
    work += ins[k].size * rk.size;
    if (work > maxWork) return null;
    let s = 0;
    for (const v of rk.values()) s += v;
    if (!(s > 0)) return null;
    const inv = 1 / s;
    savedStart[k] = savedI.length;
    for (const i of ins[k]) {
      const ri = rows[i];
      const f = (ri.get(k) as number) * inv;
      ri.delete(k);
      stored--;
      savedI.push(i);
      savedF.push(f);
      for (const [j, v] of rk) {
        if (j === i) continue;
        const old = ri.get(j);
        if (old === undefined) {
          ri.set(j, f * v);
          ins[j].add(i);
          stored++;
        } else ri.set(j, old + f * v);
      }
    }
    savedEnd[k] = savedI.length;
    for (const j of rk.keys()) ins[j].delete(k);
    stored -= rk.size;
    rows[k] = new Map();
    if (stored > limit) return null;
  }
  const x = new Float64Array(n);
  x[0] = 1;
  for (let k = 1; k < n; k++) {
    let s = 0;
    for (let q = savedStart[k]; q < savedEnd[k]; q++) s += x[savedI[q]] * savedF[q];
    x[k] = s;
  }
  const acc = new Accumulator();
  for (let i = 0; i < n; i++) acc.add(x[i]);
  const total = acc.value();
  if (!(total > 0) || !Number.isFinite(total)) return null;
  for (let i = 0; i < n; i++) x[i] /= total;
  return x;
}

/** Result of the iterative solver. */
export interface IterativeStationary {
  mu: Float64Array;
  /** Entry operations spent (each sweep counts 2·(n + nnz), each residual n + nnz). */
  work: number;
  /** ‖μP − μ‖₁ of the returned (normalised) μ. */
  residual: number;
  /** Symmetric Gauss–Seidel iterations (one forward and one backward sweep each). */
  iterations: number;
  converged: boolean;
}

/**
 * The stationary distribution of a large sparse chain by symmetric Gauss–Seidel on the singular
 * system μ(I − P) = 0:
 * μ_j ← Σ_{i≠j} μ_i P_ij / Σ_{k≠j} P_jk, a forward then a backward sweep, then normalisation.
 * The divisor is the off-diagonal row sum rather than 1 − P_jj (no cancellation for lazy states).
 * Unlike power iteration it does not need aperiodicity (a periodic ring converges in one sweep in
 * the direction of its flow) and mass carried along a ring in either direction is propagated the
 * whole way in one sweep. Stops when ‖μP − μ‖₁ ≤ tolerance (default 1e-12), after maxIterations
 * (default 2,000) or once `workBudget` entry operations (default unlimited; a sweep costs about
 * 3·(n + nnz) with its residual) are spent; `converged` tells whether the tolerance was met.
 * O(nnz) per iteration plus one transpose; the one-off sparse GTH attempt is capped at 8·(n + nnz).
 * Throws EngineNumericError on a malformed matrix, an absorbing state in a chain of more than one
 * state (reducible), or a bad initial vector.
 */
export function stationaryIterative(
  P: SparseMatrix,
  opts: { tolerance?: number; maxIterations?: number; initial?: Float64Array; workBudget?: number } = {},
): IterativeStationary {
  checkSparseNonnegative(P, "transition matrix");
  const n = P.n;
  const tolerance = opts.tolerance ?? 1e-12;
  const maxIterations = opts.maxIterations ?? 2000;
  if (!(tolerance > 0) || !Number.isFinite(tolerance)) throw new EngineNumericError(`stationaryIterative: tolerance must be > 0, got ${tolerance}`);
  if (!Number.isInteger(maxIterations) || maxIterations < 0) throw new EngineNumericError(`stationaryIterative: maxIterations must be an integer ≥ 0`);
  const workBudget = opts.workBudget ?? Infinity;
  if (!(workBudget > 0)) throw new EngineNumericError(`stationaryIterative: workBudget must be > 0, got ${workBudget}`);
  if (n === 1) return { mu: new Float64Array([1]), residual: 0, iterations: 0, converged: true, work: 0 };

  // Off-diagonal row sums (exit rates) and the transpose without its diagonal, for column access.
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let p = P.rowPtr[i]; p < P.rowPtr[i + 1]; p++) if (P.col[p] !== i) s += P.val[p];
    if (!(s > 0)) throw new EngineNumericError(`stationaryIterative: state ${i} is absorbing; the chain is reducible`);
    out[i] = s;
  }
  const T = transposeSparse(P);

  const mu = new Float64Array(n);
  if (opts.initial) {
    const init = opts.initial;
    if (init.length !== n) throw new EngineNumericError(`stationaryIterative: initial vector has ${init.length} entries, expected ${n}`);
    let s = 0;
    for (let i = 0; i < n; i++) {
      if (!(init[i] >= 0) || !Number.isFinite(init[i])) throw new EngineNumericError(`stationaryIterative: initial[${i}] = ${init[i]} must be finite and ≥ 0`);
      s += init[i];
    }
    if (!(s > 0)) throw new EngineNumericError("stationaryIterative: initial vector sums to 0");
    for (let i = 0; i < n; i++) mu[i] = init[i] / s;
  } else mu.fill(1 / n);

  const normalise = (): void => {
    const acc = new Accumulator();
    for (let i = 0; i < n; i++) acc.add(mu[i]);
    const s = acc.value();
    if (!(s > 0) || !Number.isFinite(s)) throw new EngineNumericError("stationaryIterative: iterate lost all mass (reducible chain?)");
    const inv = 1 / s;
    for (let i = 0; i < n; i++) mu[i] *= inv;
  };
  const fine: Level = { T, out };

  const size = n + P.rowPtr[n];
  let residual = stationaryResidual(P, mu);
  let work = size;
  let iterations = 0;
  let multilevel = false;
  let triedDirect = false;
  // A V-cycle costs about twice a sweep pair (the coarse levels halve in size).
  while (residual > tolerance && iterations < maxIterations && work + (multilevel ? 6 : 3) * size <= workBudget) {
    if (multilevel) vCycle(fine, mu);
    else symmetricGaussSeidel(fine, mu);
    work += (multilevel ? 6 : 3) * size;
    normalise();
    iterations++;
    const previous = residual;
    residual = stationaryResidual(P, mu);
    // Gauss–Seidel alone crawls on diffusive chains (rings, birth–death chains). These have little
    // fill under elimination, so try sparse GTH once; if the fill grows too large, switch to
    // multilevel aggregation instead.
    if (!multilevel && iterations >= 2 && residual > 0.3 * previous && residual > tolerance) {
      // Only sparse chains with few successors per state (rings, paths, banded) have little fill;
      // on a well-connected chain building the elimination maps alone would dominate the solve.
      if (!triedDirect && P.rowPtr[n] <= 4 * n) {
        triedDirect = true;
        const direct = sparseGTH(P, 4 * P.rowPtr[n] + 16 * n, 8 * size);
        work += 8 * size;
        if (direct) {
          const r = stationaryResidual(P, direct);
          if (r < residual) {
            mu.set(direct);
            residual = r;
            continue;
          }
        }
      }
      if (n > COARSEST) multilevel = true;
    }
  }
  return { mu, residual, iterations, converged: residual <= tolerance, work };
}

/** Result of stationaryReversible. */
export interface ReversibleStationary {
  mu: Float64Array;
  /** Largest |μᵢPᵢⱼ − μⱼPⱼᵢ| / max(μᵢPᵢⱼ, μⱼPⱼᵢ) over the positive entries: 0 for an exactly reversible chain. */
  balanceDefect: number;
}

/**
 * The stationary law of a reversible chain from detailed balance μᵢPᵢⱼ = μⱼPⱼᵢ (Kolmogorov's
 * criterion; Kelly 1979, ch. 1): along a breadth-first spanning tree of the transition graph,
 * ln μⱼ = ln μᵢ + ln(Pᵢⱼ/Pⱼᵢ), then μ is exponentiated (shifted by its largest log, so nothing
 * overflows) and normalised with compensation. Detailed balance on every entry then makes μ
 * stationary (Σᵢ μᵢPᵢⱼ = Σᵢ μⱼPⱼᵢ = μⱼ); `balanceDefect` measures how well it holds, so a caller
 * can tell a reversible chain from one that is not. No iteration and no elimination: a route
 * independent of the solvers and of a graph walk's closed form. O(n + nnz) with one transpose.
 * Returns null when the pattern of positive entries is not symmetric, rows are not sorted by
 * column, or the graph is not connected. Throws EngineNumericError on a malformed matrix.
 */
export function stationaryReversible(P: SparseMatrix): ReversibleStationary | null {
  checkSparseNonnegative(P, "transition matrix");
  const n = P.n;
  if (n === 1) return { mu: new Float64Array([1]), balanceDefect: 0 };
  const { rowPtr, col, val } = P;
  const T = transposeSparse(P);
  // Aligned patterns: entry p of row i is (i, j) in P and (j, i) of P in T.
  for (let i = 0; i <= n; i++) if (T.rowPtr[i] !== rowPtr[i]) return null;
  for (let p = 0; p < rowPtr[n]; p++) if (T.col[p] !== col[p] || val[p] > 0 !== T.val[p] > 0) return null;
  const logMu = new Float64Array(n);
  const seen = new Uint8Array(n);
  const queue = new Int32Array(n);
  let head = 0;
  let tail = 0;
  queue[tail++] = 0;
  seen[0] = 1;
  while (head < tail) {
    const i = queue[head++];
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const j = col[p];
      if (seen[j] || !(val[p] > 0)) continue;
      seen[j] = 1;
      logMu[j] = logMu[i] + Math.log(val[p] / T.val[p]);
      queue[tail++] = j;
    }
  }
  if (tail < n) return null;
  let top = -Infinity;
  for (let i = 0; i < n; i++) if (logMu[i] > top) top = logMu[i];
  const mu = new Float64Array(n);
  const acc = new Accumulator();
  for (let i = 0; i < n; i++) {
    mu[i] = Math.exp(logMu[i] - top);
    acc.add(mu[i]);
  }
  const total = acc.value();
  for (let i = 0; i < n; i++) mu[i] /= total;
  let defect = 0;
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      if (!(val[p] > 0)) continue;
      const a = mu[i] * val[p];
      const b = mu[col[p]] * T.val[p];
      const d = Math.abs(a - b) / Math.max(a, b);
      if (Number.isNaN(d)) defect = Infinity; // both products underflowed: not usable
      else if (d > defect) defect = d;
    }
  }
  return { mu, balanceDefect: defect };
}
