/**
 * Shannon entropy rates: the general Markov formula and the closed forms (i.i.d., two-state,
 * random walk on a weighted graph).
 */
import type { DenseMatrix, Rate, SparseMatrix } from "./types";
import { Accumulator, LN2, ROW_SUM_TOLERANCE, binaryEntropyBits, negXLog2X } from "./numeric";
import { EngineNumericError } from "./stationary";
import { checkDenseNonnegative, checkSparseNonnegative, isSparseMatrix, sparseFromTriples } from "./sparse";

function rate(bits: number): Rate {
  // Entropies are ≥ 0; a compensated sum of non-negative terms can only round to −0, never below.
  const b = bits > 0 ? bits : 0;
  return { bits: b, nats: b * LN2 };
}

/**
 * The entropy rate −Σ μᵢ Pᵢⱼ log Pᵢⱼ = Σ μᵢ h(Pᵢ·) (Shannon 1948) in bits and nats, summed row by
 * row with compensation; never as H(X₁,X₂) − H(X₁), which cancels. μ is used as given (it should
 * be stationary); entries of μ below 0 by no more than 1e-12 are rounding and count as 0.
 * O(n²) dense, O(n + nnz) sparse. Throws EngineNumericError on a malformed P, a non-finite or
 * negative entry, or μ of the wrong length / with a non-finite or clearly negative entry.
 */
export function entropyRateGeneral(P: DenseMatrix | SparseMatrix, mu: ArrayLike<number>): Rate {
  const sparse = isSparseMatrix(P);
  if (sparse) checkSparseNonnegative(P, "transition matrix");
  else checkDenseNonnegative(P, "transition matrix");
  const n = P.n;
  if (mu.length !== n) throw new EngineNumericError(`entropyRateGeneral: μ has ${mu.length} entries, P has ${n} states`);
  const total = new Accumulator();
  for (let i = 0; i < n; i++) {
    const m = mu[i];
    if (!Number.isFinite(m) || m < -1e-12) throw new EngineNumericError(`entropyRateGeneral: μ[${i}] = ${m} is not a probability`);
    if (m <= 0) continue;
    const row = new Accumulator();
    if (sparse) {
      for (let p = P.rowPtr[i]; p < P.rowPtr[i + 1]; p++) row.add(negXLog2X(P.val[p]));
    } else {
      const r = i * n;
      for (let j = 0; j < n; j++) row.add(negXLog2X(P.data[r + j]));
    }
    total.add(m * row.value());
  }
  return rate(total.value());
}

/**
 * The entropy rate of an i.i.d. source, H(p) = −Σ pᵢ log pᵢ. O(n), compensated.
 * Throws EngineNumericError if p is empty, has a negative or non-finite entry, or does not sum to 1
 * within 1e-9.
 */
export function entropyRateIid(p: ArrayLike<number>): Rate {
  if (p.length < 1) throw new EngineNumericError("entropyRateIid: empty distribution");
  const sum = new Accumulator();
  const h = new Accumulator();
  for (let i = 0; i < p.length; i++) {
    const x = p[i];
    if (!(x >= 0) || x === Infinity) throw new EngineNumericError(`entropyRateIid: p[${i}] = ${x} must be finite and ≥ 0`);
    sum.add(x);
    h.add(negXLog2X(x));
  }
  if (Math.abs(sum.value() - 1) > ROW_SUM_TOLERANCE) throw new EngineNumericError(`entropyRateIid: probabilities sum to ${sum.value()}, not 1`);
  return rate(h.value());
}

/**
 * The two-state chain with a = P(0→1), b = P(1→0): μ = (b, a)/(a + b) and rate
 * (b·h(a) + a·h(b))/(a + b). O(1). Throws EngineNumericError if a or b is outside [0, 1] or not a
 * number, or a + b = 0 (both states absorbing: reducible, no single rate).
 */
export function entropyRateTwoState(a: number, b: number): { rate: Rate; stationary: [number, number] } {
  if (!(a >= 0 && a <= 1)) throw new EngineNumericError(`entropyRateTwoState: a = ${a} must lie in [0, 1]`);
  if (!(b >= 0 && b <= 1)) throw new EngineNumericError(`entropyRateTwoState: b = ${b} must lie in [0, 1]`);
  const s = a + b;
  if (s === 0) throw new EngineNumericError("entropyRateTwoState: a = b = 0, both states are absorbing (reducible chain)");
  const mu0 = b / s;
  const mu1 = a / s;
  return { rate: rate((b * binaryEntropyBits(a) + a * binaryEntropyBits(b)) / s), stationary: [mu0, mu1] };
}

/** An undirected weighted edge list; a self-loop u == v adds w to u's weight once. */
export interface WeightedEdges {
  u: Int32Array;
  v: Int32Array;
  w: Float64Array;
}

// The loops below throw through these helpers: a template string built inside a hot loop makes
// V8's optimised code for the whole loop about three times slower (measured with bench:engine).
function edgeOutside(e: number, a: number, b: number, nodes: number): never {
  throw new EngineNumericError(`graph walk: edge ${e} joins ${a} and ${b}, outside 0…${nodes - 1}`);
}
function badWeight(e: number, x: number): never {
  throw new EngineNumericError(`graph walk: edge ${e} has weight ${x}; weights must be finite and ≥ 0`);
}
function isolatedNode(i: number): never {
  throw new EngineNumericError(`graph walk: node ${i} has no edges`);
}

function checkEdges(nodes: number, edges: WeightedEdges): void {
  if (!Number.isInteger(nodes) || nodes < 1) throw new EngineNumericError(`graph walk: node count must be a positive integer, got ${nodes}`);
  const m = edges.u.length;
  if (edges.v.length !== m || edges.w.length !== m) throw new EngineNumericError("graph walk: u, v and w must have the same length");
  for (let e = 0; e < m; e++) {
    const u = edges.u[e];
    const v = edges.v[e];
    if (!(u >= 0 && u < nodes) || !(v >= 0 && v < nodes)) edgeOutside(e, u, v, nodes);
    const w = edges.w[e];
    if (!(w >= 0) || w === Infinity) badWeight(e, w);
  }
}

/** Node weights Wᵢ = Σ_j wᵢⱼ (a self-loop counted once); throws if a node has no weight. */
function nodeWeights(nodes: number, edges: WeightedEdges): Float64Array {
  const W = new Float64Array(nodes);
  const { u, v, w } = edges;
  for (let e = 0; e < u.length; e++) {
    W[u[e]] += w[e];
    if (u[e] !== v[e]) W[v[e]] += w[e];
  }
  for (let i = 0; i < nodes; i++) if (!(W[i] > 0)) isolatedNode(i);
  return W;
}

/**
 * The random walk on an undirected weighted graph, in closed form: μᵢ = Wᵢ/2W and
 * H = H({wᵢⱼ/2W}) − H({Wᵢ/2W}) (the walk is reversible; Levin, Peres and Wilmer, ch. 1–2), with
 * parallel edges merged first. Expanded, that is H = (Σᵢ Wᵢ log₂ Wᵢ − Σ₍ᵢ,ⱼ₎ wᵢⱼ log₂ wᵢⱼ) / 2W over
 * ordered pairs, which needs one logarithm per node and per merged edge and no linear solve. The
 * graph is assumed connected (the caller checks components). O(nodes + edges) time and memory.
 * Throws EngineNumericError on an index out of range, a negative or non-finite weight, or a node
 * without edges.
 */
export function graphWalkClosedForm(nodes: number, edges: WeightedEdges): { rate: Rate; stationary: Float64Array } {
  if (!Number.isInteger(nodes) || nodes < 1) throw new EngineNumericError(`graph walk: node count must be a positive integer, got ${nodes}`);
  const { u, v, w } = edges;
  const m = u.length;
  if (v.length !== m || w.length !== m) throw new EngineNumericError("graph walk: u, v and w must have the same length");

  // Parallel edges are merged per unordered pair {lo, hi}. Sorting all edges by lo scatters them
  // over the whole array (a cache miss per edge); instead they are partitioned by lo's block of
  // 2^SH consecutive nodes (few write streams) and merged inside each block with a small hash
  // table that stays in cache. The key hi·2^SH + (lo mod 2^SH) must fit a non-negative int32.
  let SH = 9;
  while (SH > 0 && nodes * 2 ** SH > 2 ** 31) SH--;
  const blocks = ((nodes - 1) >>> SH) + 1;

  // Pass 1: check each edge, node weights, block sizes; then the node pass.
  const W = new Float64Array(nodes);
  const blockStart = new Int32Array(blocks + 1);
  checkAndWeigh(nodes, u, v, w, SH, W, blockStart);
  const { twoW, nodeTerm } = nodeSums(W);
  if (!(twoW >= 2 ** -900 && twoW <= 2 ** 900)) {
    // x·log₂x could overflow or lose its last bits: rescale by a power of two (exact; the walk
    // does not change when every weight is multiplied by the same factor).
    const scale = 2 ** -Math.round(Math.log2(twoW));
    return graphWalkClosedForm(nodes, { u, v, w: Float64Array.from(w, (x) => x * scale) });
  }
  let maxBlock = 0;
  for (let k = 1; k <= blocks; k++) if (blockStart[k] > maxBlock) maxBlock = blockStart[k];

  // Pass 2: scatter (key, weight) pairs into their blocks.
  const keys = new Int32Array(m);
  const weights = new Float64Array(m);
  scatterToBlocks(u, v, w, SH, blockStart, keys, weights);

  const edgeTerm = mergedEdgeTerm(keys, weights, blockStart, blocks, maxBlock, SH);
  const stationary = W;
  for (let i = 0; i < nodes; i++) stationary[i] /= twoW;
  return { rate: rate((nodeTerm - edgeTerm) / twoW), stationary };
}

// graphWalkClosedForm's passes are separate functions, so that V8 optimises each loop whole after
// a call or two instead of by on-stack replacement inside one long function (which kept
// deoptimising as later loops were reached and took several calls to settle).

/** Pass 1: checks every edge, adds node weights Wᵢ and counts edges per block of lo. */
function checkAndWeigh(nodes: number, u: Int32Array, v: Int32Array, w: Float64Array, SH: number, W: Float64Array, blockStart: Int32Array): void {
  const m = u.length;
  for (let e = 0; e < m; e++) {
    const a = u[e];
    const b = v[e];
    if (!(a >= 0 && a < nodes) || !(b >= 0 && b < nodes)) edgeOutside(e, a, b, nodes);
    const x = w[e];
    if (!(x >= 0) || x === Infinity) badWeight(e, x);
    W[a] += x;
    if (a !== b) W[b] += x;
    blockStart[((a < b ? a : b) >>> SH) + 1]++;
  }
}

/** Node pass: 2W = Σ Wᵢ and Σ Wᵢ log₂ Wᵢ, both compensated; throws on an isolated node. */
function nodeSums(W: Float64Array): { twoW: number; nodeTerm: number } {
  const total = new Accumulator();
  const nodeTerm = new Accumulator();
  for (let i = 0; i < W.length; i++) {
    const x = W[i];
    if (!(x > 0)) isolatedNode(i);
    total.add(x);
    nodeTerm.add(x * Math.log2(x));
  }
  return { twoW: total.value(), nodeTerm: nodeTerm.value() };
}

/** Pass 2: turns blockStart's counts into offsets and scatters (key, weight) into the blocks. */
function scatterToBlocks(u: Int32Array, v: Int32Array, w: Float64Array, SH: number, blockStart: Int32Array, keys: Int32Array, weights: Float64Array): void {
  const blocks = blockStart.length - 1;
  for (let k = 0; k < blocks; k++) blockStart[k + 1] += blockStart[k];
  const fill = blockStart.slice(0, blocks);
  const LOW = (1 << SH) - 1;
  for (let e = 0; e < u.length; e++) {
    const a = u[e];
    const b = v[e];
    const lo = a < b ? a : b;
    const p = fill[lo >>> SH]++;
    keys[p] = ((a < b ? b : a) << SH) | (lo & LOW);
    weights[p] = w[e];
  }
}

/**
 * Pass 3 of graphWalkClosedForm: Σ c·x log₂ x over merged edges (its own function, so V8
 * optimises this loop whole rather than by on-stack replacement inside the long caller).
 */
function mergedEdgeTerm(keys: Int32Array, weights: Float64Array, blockStart: Int32Array, blocks: number, maxBlock: number, SH: number): number {
  const LOW = (1 << SH) - 1;
  // Per block, merge equal keys (open addressing, Fibonacci hashing) and add
  // c·x log₂ x for each merged edge (c = 2 for the two directions, 1 for a loop); a later parallel
  // edge replaces its pair's term by the merged one. Neumaier summation, inlined.
  let capBits = 4;
  while (1 << capBits < 2 * maxBlock) capBits++;
  const mask = (1 << capBits) - 1;
  const hashShift = 32 - capBits;
  const stamp = new Int32Array(mask + 1).fill(-1);
  const tableKey = new Int32Array(mask + 1);
  const tableWeight = new Float64Array(mask + 1);
  let sum = 0;
  let comp = 0;
  for (let k = 0; k < blocks; k++) {
    const base = k << SH;
    for (let q = blockStart[k]; q < blockStart[k + 1]; q++) {
      const key = keys[q];
      const x = weights[q];
      let h = Math.imul(key, 0x9e3779b1) >>> hashShift;
      while (stamp[h] === k && tableKey[h] !== key) h = (h + 1) & mask;
      const c = (base | (key & LOW)) === key >>> SH ? 1 : 2;
      let term: number;
      if (stamp[h] === k) {
        const old = tableWeight[h];
        const merged = old + x;
        tableWeight[h] = merged;
        term = c * ((merged > 0 ? merged * Math.log2(merged) : 0) - (old > 0 ? old * Math.log2(old) : 0));
      } else {
        stamp[h] = k;
        tableKey[h] = key;
        tableWeight[h] = x;
        term = x > 0 ? c * x * Math.log2(x) : 0;
      }
      const t = sum + term;
      if (Math.abs(sum) >= Math.abs(term)) comp += sum - t + term;
      else comp += term - t + sum;
      sum = t;
    }
  }
  return sum + comp;
}

/**
 * The transition matrix of the random walk, Pᵢⱼ = wᵢⱼ/Wᵢ, in CSR (parallel edges summed, a
 * self-loop adds its weight once to Pᵢᵢ). O(nodes + edges) plus short per-row sorts.
 * Throws EngineNumericError like graphWalkClosedForm.
 */
export function graphWalkMatrix(nodes: number, edges: WeightedEdges): SparseMatrix {
  checkEdges(nodes, edges);
  const W = nodeWeights(nodes, edges);
  const m = edges.u.length;
  let loops = 0;
  for (let e = 0; e < m; e++) if (edges.u[e] === edges.v[e]) loops++;
  const size = 2 * m - loops;
  const rows = new Int32Array(size);
  const cols = new Int32Array(size);
  const vals = new Float64Array(size);
  let t = 0;
  for (let e = 0; e < m; e++) {
    const a = edges.u[e];
    const b = edges.v[e];
    rows[t] = a;
    cols[t] = b;
    vals[t] = edges.w[e] / W[a];
    t++;
    if (a !== b) {
      rows[t] = b;
      cols[t] = a;
      vals[t] = edges.w[e] / W[b];
      t++;
    }
  }
  return sparseFromTriples(nodes, rows, cols, vals);
}
