/**
 * Min-entropy rate of a Markov chain: minus the maximum mean cycle of log₂ Pᵢⱼ, by Karp's formula
 * and, independently, by Howard policy iteration.
 */
import type { DenseMatrix, Rate, SparseMatrix } from "./types";
import { Accumulator, LN2 } from "./numeric";
import { EngineNumericError } from "./stationary";
import { checkDenseNonnegative, checkSparseNonnegative, isSparseMatrix } from "./sparse";

/** The positive entries of P as a graph with weight ln Pᵢⱼ per edge (CSR, zeros dropped). */
export interface LogGraph {
  n: number;
  rowPtr: Int32Array;
  col: Int32Array;
  /** ln Pᵢⱼ. */
  logw: Float64Array;
  /** Pᵢⱼ itself. */
  prob: Float64Array;
}

/**
 * Builds the log-weight graph of a nonnegative matrix. O(n²) dense, O(n + nnz) sparse.
 * Throws EngineNumericError on a malformed matrix, a negative / non-finite entry, or a row without a
 * positive entry (a state with nowhere to go).
 */
export function logGraph(P: DenseMatrix | SparseMatrix): LogGraph {
  if (!isSparseMatrix(P)) return denseLogGraph(P);
  checkSparseNonnegative(P, "transition matrix");
  const S = P;
  const n = S.n;
  let nnz = 0;
  for (let p = 0; p < S.rowPtr[n]; p++) if (S.val[p] > 0) nnz++;
  const rowPtr = new Int32Array(n + 1);
  const col = new Int32Array(nnz);
  const logw = new Float64Array(nnz);
  const prob = new Float64Array(nnz);
  let q = 0;
  for (let i = 0; i < n; i++) {
    for (let p = S.rowPtr[i]; p < S.rowPtr[i + 1]; p++) {
      const x = S.val[p];
      if (x > 0) {
        col[q] = S.col[p];
        prob[q] = x;
        logw[q] = Math.log(x);
        q++;
      }
    }
    if (q === rowPtr[i]) throw new EngineNumericError(`transition matrix: row ${i} has no positive entry`);
    rowPtr[i + 1] = q;
  }
  return { n, rowPtr, col, logw, prob };
}

/** logGraph of a dense matrix, read straight from its rows (no sparse copy in between). */
function denseLogGraph(P: DenseMatrix): LogGraph {
  checkDenseNonnegative(P, "transition matrix");
  const { n, data } = P;
  let nnz = 0;
  for (let p = 0; p < n * n; p++) if (data[p] > 0) nnz++;
  const rowPtr = new Int32Array(n + 1);
  const col = new Int32Array(nnz);
  const logw = new Float64Array(nnz);
  const prob = new Float64Array(nnz);
  let q = 0;
  for (let i = 0; i < n; i++) {
    const r = i * n;
    for (let j = 0; j < n; j++) {
      const x = data[r + j];
      if (x > 0) {
        col[q] = j;
        prob[q] = x;
        logw[q] = Math.log(x);
        q++;
      }
    }
    if (q === rowPtr[i]) throw new EngineNumericError(`transition matrix: row ${i} has no positive entry`);
    rowPtr[i + 1] = q;
  }
  return { n, rowPtr, col, logw, prob };
}

function bitsRate(bits: number): Rate {
  const b = bits > 0 ? bits : 0; // −0 and rounding below zero become 0: a cycle mean of log P is ≤ 0.
  return { bits: b, nats: b * LN2 };
}

// Beyond this many states the Karp table D_k(v) is not kept (O(n) memory, two passes instead).
const KARP_TABLE_LIMIT = 4096;

/**
 * The min-entropy rate −max_cycle mean(log₂ Pᵢⱼ) by Karp's formula (Karp 1978) on costs
 * c = −log₂ P: with D_k(v) the least cost of a k-edge walk ending at v (from any start),
 * the minimum cycle mean is min_v max_{0≤k<n} (D_n(v) − D_k(v))/(n − k). For an irreducible P this
 * is the chain's min-entropy rate; for a reducible one it covers every cycle of the graph, so restrict
 * P to a closed class first. O(n·nnz) time (O(n³) dense: use minEntropyRateHoward for large n);
 * O(n²) memory up to 4,096 states, O(n + nnz) with a second pass beyond.
 * Throws EngineNumericError like logGraph.
 */
export function minEntropyRateKarp(P: DenseMatrix | SparseMatrix): Rate {
  const G = logGraph(P);
  const n = G.n;
  const { rowPtr, col } = G;
  const cost = new Float64Array(G.logw.length);
  for (let p = 0; p < cost.length; p++) cost[p] = -G.logw[p] / LN2;
  const step = (from: Float64Array, to: Float64Array): void => {
    to.fill(Infinity);
    for (let u = 0; u < n; u++) {
      const du = from[u];
      if (du === Infinity) continue;
      for (let p = rowPtr[u]; p < rowPtr[u + 1]; p++) {
        const t = du + cost[p];
        const v = col[p];
        if (t < to[v]) to[v] = t;
      }
    }
  };
  const worst = new Float64Array(n).fill(-Infinity); // max_k (D_n(v) − D_k(v))/(n − k)
  let Dn: Float64Array;
  if (n <= KARP_TABLE_LIMIT) {
    const table: Float64Array[] = [new Float64Array(n)];
    for (let k = 0; k < n; k++) {
      const next = new Float64Array(n);
      step(table[k], next);
      table.push(next);
    }
    Dn = table[n];
    for (let k = 0; k < n; k++) {
      const Dk = table[k];
      for (let v = 0; v < n; v++) {
        if (Dk[v] === Infinity || Dn[v] === Infinity) continue;
        const r = (Dn[v] - Dk[v]) / (n - k);
        if (r > worst[v]) worst[v] = r;
      }
    }
  } else {
    let a = new Float64Array(n);
    let b = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      step(a, b);
      [a, b] = [b, a];
    }
    Dn = Float64Array.from(a);
    a.fill(0);
    for (let k = 0; k < n; k++) {
      for (let v = 0; v < n; v++) {
        if (a[v] === Infinity || Dn[v] === Infinity) continue;
        const r = (Dn[v] - a[v]) / (n - k);
        if (r > worst[v]) worst[v] = r;
      }
      step(a, b);
      [a, b] = [b, a];
    }
  }
  let best = Infinity;
  for (let v = 0; v < n; v++) if (Dn[v] !== Infinity && worst[v] < best) best = worst[v];
  if (!Number.isFinite(best)) throw new EngineNumericError("minEntropyRateKarp: the graph has no cycle");
  return bitsRate(best);
}

/** Result of Howard policy iteration on a log-weight graph. */
export interface HowardResult {
  /** The maximum cycle mean of ln Pᵢⱼ (≤ 0), recomputed exactly from `cycle`. */
  maxMeanLog: number;
  /** A cycle attaining it, as states in walk order, starting at its smallest state. */
  cycle: number[];
  /** Per-state cycle mean of the final policy (all equal for an irreducible chain). */
  eta: Float64Array;
  /** Bias (potential) x with ln Pᵢⱼ − η + x_j ≤ x_i (up to rounding) on every edge. */
  bias: Float64Array;
  iterations: number;
}

/**
 * Maximum mean cycle of ln Pᵢⱼ by Howard policy iteration (Cochet-Terrasson, Cohen, Gaubert,
 * McGettrick and Quadrat 1998): each state keeps one outgoing edge (a policy); the policy graph's
 * cycles give cycle means η and biases x; each state then switches to an edge with a larger η, or,
 * if none improves η anywhere, to one with a larger ln P − η + x. Stops when nothing changes.
 * O(n + nnz) per iteration; the number of iterations is small in practice (no polynomial bound is known).
 */
export function howardMaxMeanCycle(G: LogGraph): HowardResult {
  const n = G.n;
  const { rowPtr, col, logw } = G;
  let scale = 1;
  for (let p = 0; p < logw.length; p++) scale = Math.max(scale, Math.abs(logw[p]));
  const eps = 1e-13 * scale;
  const policy = new Int32Array(n);
  for (let v = 0; v < n; v++) {
    let best = rowPtr[v];
    for (let p = rowPtr[v] + 1; p < rowPtr[v + 1]; p++) if (logw[p] > logw[best]) best = p;
    policy[v] = best;
  }
  const eta = new Float64Array(n);
  const bias = new Float64Array(n);
  const stamp = new Int32Array(n);
  const childStart = new Int32Array(n + 1);
  const children = new Int32Array(n);
  const queue = new Int32Array(n);
  const done = new Uint8Array(n);
  let bestMean = -Infinity;
  let bestRoot = 0;
  let iterations = 0;
  const maxIterations = 100 * n + 1000;

  for (;;) {
    iterations++;
    // Inverse policy graph (children of v: states whose policy edge enters v).
    childStart.fill(0);
    for (let v = 0; v < n; v++) childStart[col[policy[v]] + 1]++;
    for (let v = 0; v < n; v++) childStart[v + 1] += childStart[v];
    const fill = childStart.slice(0, n);
    for (let v = 0; v < n; v++) children[fill[col[policy[v]]]++] = v;
    // Find the policy cycles; evaluate each and spread η, x backwards from its root.
    stamp.fill(-1);
    done.fill(0);
    bestMean = -Infinity;
    let cycles = 0;
    for (let s = 0; s < n; s++) {
      if (stamp[s] !== -1) continue;
      let u = s;
      while (stamp[u] === -1) {
        stamp[u] = s;
        u = col[policy[u]];
      }
      if (stamp[u] !== s || done[u]) continue;
      // u lies on a new cycle.
      cycles++;
      const acc = new Accumulator();
      let len = 0;
      let w = u;
      do {
        acc.add(logw[policy[w]]);
        len++;
        w = col[policy[w]];
      } while (w !== u);
      const mean = acc.value() / len;
      if (mean > bestMean) {
        bestMean = mean;
        bestRoot = u;
      }
      eta[u] = mean;
      bias[u] = 0;
      done[u] = 1;
      let head = 0;
      let tail = 0;
      queue[tail++] = u;
      while (head < tail) {
        const v = queue[head++];
        for (let q = childStart[v]; q < childStart[v + 1]; q++) {
          const c = children[q];
          if (done[c]) continue;
          done[c] = 1;
          eta[c] = mean;
          bias[c] = logw[policy[c]] - mean + bias[v];
          queue[tail++] = c;
        }
      }
    }
    if (iterations >= maxIterations) break;
    // Improvement: first by η, then (if η cannot improve anywhere) by bias. With a single policy
    // cycle every η is the same number, so the η pass cannot change anything and is skipped.
    let changed = false;
    for (let v = 0; v < n && cycles > 1; v++) {
      let best = policy[v];
      let bestEta = eta[col[best]];
      for (let p = rowPtr[v]; p < rowPtr[v + 1]; p++) {
        const e = eta[col[p]];
        if (e > bestEta + eps) {
          best = p;
          bestEta = e;
        }
      }
      if (bestEta > eta[v] + eps && best !== policy[v]) {
        policy[v] = best;
        changed = true;
      }
    }
    if (!changed) {
      for (let v = 0; v < n; v++) {
        let best = policy[v];
        let bestVal = logw[best] - eta[v] + bias[col[best]];
        for (let p = rowPtr[v]; p < rowPtr[v + 1]; p++) {
          const u = col[p];
          if (eta[u] < eta[v] - eps) continue;
          const val = logw[p] - eta[v] + bias[u];
          if (val > bestVal + eps) {
            best = p;
            bestVal = val;
          }
        }
        if (bestVal > bias[v] + eps && best !== policy[v]) {
          policy[v] = best;
          changed = true;
        }
      }
    }
    if (!changed) break;
  }
  // The best cycle, starting at its smallest state.
  const cyc: number[] = [];
  let w = bestRoot;
  do {
    cyc.push(w);
    w = col[policy[w]];
  } while (w !== bestRoot);
  let m = 0;
  for (let t = 1; t < cyc.length; t++) if (cyc[t] < cyc[m]) m = t;
  const cycle = cyc.slice(m).concat(cyc.slice(0, m));
  return { maxMeanLog: bestMean, cycle, eta, bias, iterations };
}

/**
 * The min-entropy rate −max_cycle mean(log₂ Pᵢⱼ) by Howard policy iteration (see
 * howardMaxMeanCycle), with a cycle that attains it; the figure is recomputed from that cycle's own
 * entries. Fast in practice: use it for large chains, Karp for cross-checks. For a reducible P it
 * covers every cycle of the graph. O(n + nnz) per iteration.
 * Throws EngineNumericError like logGraph.
 */
export function minEntropyRateHoward(P: DenseMatrix | SparseMatrix): { rate: Rate; cycle: number[] } {
  const G = logGraph(P);
  return minEntropyRateFromHoward(G, howardMaxMeanCycle(G));
}

/**
 * minEntropyRateHoward from a Howard result already at hand (for example one shared with the
 * Rényi rates of the same chain): the mean of −log₂ P along h's cycle, recomputed from G's own
 * entries. O(cycle length · row length). Never throws.
 */
export function minEntropyRateFromHoward(G: LogGraph, h: HowardResult): { rate: Rate; cycle: number[] } {
  const { cycle } = h;
  // Exact mean of −log₂ P along the returned cycle.
  const acc = new Accumulator();
  for (let t = 0; t < cycle.length; t++) {
    const i = cycle[t];
    const j = cycle[(t + 1) % cycle.length];
    let x = 0;
    for (let p = G.rowPtr[i]; p < G.rowPtr[i + 1]; p++) if (G.col[p] === j) x = G.prob[p];
    acc.add(-Math.log2(x));
  }
  return { rate: bitsRate(acc.value() / cycle.length), cycle };
}

/**
 * The min-entropy rate of a reversible chain in closed form, given its stationary law μ (for a
 * random walk on a graph, μᵢ = Wᵢ/2W): detailed balance μᵢPᵢⱼ = μⱼPⱼᵢ gives Pᵢⱼ = sᵢⱼ·√(μⱼ/μᵢ)
 * with sᵢⱼ = √(PᵢⱼPⱼᵢ) symmetric, so along any cycle the √μ factors cancel and the mean of ln P is
 * the mean of ln s, at most max ln sᵢⱼ, which the two-step cycle i → j → i (or a loop) attains:
 * H_min = −log₂ max sᵢⱼ, with sᵢⱼ evaluated as Pᵢⱼ·√(μᵢ/μⱼ) (for a graph walk wᵢⱼ/√(WᵢWⱼ)).
 * Derived here from detailed balance (common practice, no source); verification checks it against
 * Karp or Howard on the same chain. O(n + nnz). Throws EngineNumericError on a malformed P, or μ of
 * the wrong length or with an entry that is not positive and finite.
 */
export function reversibleMinEntropyRate(P: SparseMatrix, mu: ArrayLike<number>): Rate {
  checkSparseNonnegative(P, "transition matrix");
  const n = P.n;
  if (mu.length !== n) throw new EngineNumericError(`reversibleMinEntropyRate: μ has ${mu.length} entries, P has ${n} states`);
  const root = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const m = mu[i];
    if (!(m > 0) || m === Infinity) throw new EngineNumericError(`reversibleMinEntropyRate: μ[${i}] = ${m} must be positive and finite`);
    root[i] = Math.sqrt(m);
  }
  const { rowPtr, col, val } = P;
  let best = 0;
  for (let i = 0; i < n; i++) {
    const ri = root[i];
    const end = rowPtr[i + 1];
    for (let p = rowPtr[i]; p < end; p++) {
      const s = (val[p] * ri) / root[col[p]];
      if (s > best) best = s;
    }
  }
  if (!(best > 0)) throw new EngineNumericError("reversibleMinEntropyRate: P has no positive entry");
  return bitsRate(-Math.log2(best));
}
