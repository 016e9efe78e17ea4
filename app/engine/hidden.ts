/**
 * Hidden Markov sources: a stationary hidden chain X (transition matrix P, stationary vector μ)
 * and symbols Y_t drawn from the emission row B[X_t]. Their entropy rate has no closed form; the
 * engine brackets it exactly and estimates it by Monte Carlo.
 */

import type { DenseMatrix } from "./types";
import { Accumulator, compensatedSum } from "./numeric";
import { createRng } from "./rng";
import { sampleHiddenPath } from "./sample-path";

/** Emission probabilities, row-major states × symbols: entry (i, y) = P(Y_t = y | X_t = i). */
export interface EmissionMatrix {
  states: number;
  symbols: number;
  data: Float64Array;
}

/** Misuse of the hidden-source functions: shapes that do not match, bad options. */
export class HiddenSourceError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "HiddenSourceError";
  }
}

/** The bounds crossed by more than rounding can explain: a bug, never a property of the input. */
export class BoundsInvariantError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "BoundsInvariantError";
  }
}

/** Rounding slack within which lower > upper (or a bound < 0) is clamped rather than reported as a bug. */
export const BOUNDS_ROUNDING_SLACK = 1e-12;

/** Largest maxN accepted: per-level buffers grow with the depth reached (O(N · (s + k)) memory). */
export const MAX_BOUNDS_N = 100000;

/** Slack on μ being a stationary probability vector of P (‖μP − μ‖₁ and |Σμ − 1|). */
const STATIONARY_SLACK = 1e-6;

function checkSource(P: DenseMatrix, B: EmissionMatrix, mu: Float64Array): { s: number; k: number } {
  const s = P.n;
  if (!Number.isSafeInteger(s) || s <= 0) throw new HiddenSourceError(`hidden chain order must be a positive integer, got ${String(s)}`);
  if (P.data.length !== s * s) {
    throw new HiddenSourceError(`transition matrix: data has length ${P.data.length}, expected ${s}×${s} = ${s * s}`);
  }
  if (B.states !== s) throw new HiddenSourceError(`emission matrix has ${B.states} states, the hidden chain has ${s}`);
  const k = B.symbols;
  if (!Number.isSafeInteger(k) || k <= 0) throw new HiddenSourceError(`emission alphabet size must be a positive integer, got ${String(k)}`);
  if (B.data.length !== s * k) {
    throw new HiddenSourceError(`emission matrix: data has length ${B.data.length}, expected ${s}×${k} = ${s * k}`);
  }
  if (mu.length !== s) throw new HiddenSourceError(`stationary vector has ${mu.length} entries, the hidden chain has ${s}`);
  for (let i = 0; i < s * s; i++) {
    if (!(P.data[i] >= 0) || !Number.isFinite(P.data[i])) {
      throw new HiddenSourceError(`transition matrix: entry (${Math.floor(i / s)}, ${i % s}) is ${String(P.data[i])}`);
    }
  }
  for (let i = 0; i < s * k; i++) {
    if (!(B.data[i] >= 0) || !Number.isFinite(B.data[i])) {
      throw new HiddenSourceError(`emission matrix: entry (${Math.floor(i / k)}, ${i % k}) is ${String(B.data[i])}`);
    }
  }
  for (let i = 0; i < s; i++) {
    if (!(mu[i] >= 0) || !Number.isFinite(mu[i])) throw new HiddenSourceError(`stationary vector: entry ${i} is ${String(mu[i])}`);
  }
  const total = compensatedSum(mu);
  if (Math.abs(total - 1) > STATIONARY_SLACK) throw new HiddenSourceError(`stationary vector sums to ${total}, not 1`);
  // The exact bounds prune output strings of probability 0, which is only sound for a stationary μ.
  let residual = 0;
  for (let j = 0; j < s; j++) {
    const acc = new Accumulator();
    for (let i = 0; i < s; i++) acc.add(mu[i] * P.data[i * s + j]);
    residual += Math.abs(acc.value() - mu[j]);
  }
  if (residual > STATIONARY_SLACK) {
    throw new HiddenSourceError(`the given vector is not stationary for P (‖μP − μ‖₁ = ${residual.toExponential(2)})`);
  }
  return { s, k };
}

/** One level of the sandwich, in bits per symbol. */
export interface HiddenBound {
  n: number;
  lower: number;
  upper: number;
}

/** Largest frontier (strings at the deepest level) kept between passes so a deeper pass can resume. */
const FRONTIER_CAP = 1 << 16;

/**
 * Exact enumeration of output strings, depth first, in passes. Strings grow by prepending a
 * symbol, carrying the vector b(w)_i = P(Y_1^t = w | X_1 = i) (a backward-recursion vector): with
 * c = P·b(w), b(yw)_i = B(i, y)·c_i and p(yw) = Σ_i μ_i B(i, y) c_i. One vector of s numbers per
 * string thus gives both P(Y^t = w) = μ·b(w) and every P(Y^t = w | X_1 = i). By stationarity,
 * H(Y^t) − H(Y^{t−1}) = H(Y_1 | Y_2^t), summed here term by term without cancellation; and
 * H(Y^t | X_1) = H(Y_1 | X_1) + Σ_i μ_i H(Y_2^t | X_1 = i), the second sum built from the vectors c.
 * Strings of probability 0 are pruned (sound because μ is stationary: p(yw) ≤ p(w)).
 */
class StringWalker {
  private readonly s: number;
  private readonly k: number;
  private readonly Pd: Float64Array;
  private readonly mu: Float64Array;
  private readonly muB: Float64Array; // μ_i B(i, y), symbol-major for the dot products
  private readonly bT: Float64Array; // B transposed: bT[y·s + i] = B(i, y)
  readonly unitCost: number;
  /** live[t]: strings of length t with positive probability, t = 0 … reached. */
  live: number[] = [1];
  /** upper[t] = H(Y_1 | Y_2^t), accumulated over the strings of length t − 1. */
  upper: Accumulator[] = [new Accumulator()];
  /** cond[t] = H(Y_2^t | X_1) (0 at t = 1). */
  cond: Accumulator[] = [new Accumulator()];
  /** block[t] = H(Y^t). */
  block: Accumulator[] = [new Accumulator()];
  /** Deepest level whose figures are complete. */
  reached = 0;
  /** The vectors b(w) of every live string at level `reached`, flat, or null if there were too many. */
  frontier: Float64Array | null;
  expansions = 0;
  private bStack: Float64Array[] = [];
  private cStack: Float64Array[] = [];
  private pStack: Float64Array[] = [];
  private nextChild = new Int32Array(1);

  constructor(P: DenseMatrix, B: EmissionMatrix, mu: Float64Array) {
    const s = P.n;
    const k = B.symbols;
    this.s = s;
    this.k = k;
    this.Pd = P.data;
    this.mu = mu;
    this.muB = new Float64Array(s * k);
    this.bT = new Float64Array(k * s);
    for (let y = 0; y < k; y++) {
      for (let i = 0; i < s; i++) {
        this.muB[y * s + i] = mu[i] * B.data[i * k + y];
        this.bT[y * s + i] = B.data[i * k + y];
      }
    }
    // c = P·b, the children's probabilities, and the children's vectors.
    this.unitCost = s * s + 2 * s * k;
    this.frontier = new Float64Array(s).fill(1); // the empty string: b = 1
  }

  /** Forget everything deeper than the root (to restart when the frontier was not kept). */
  restart(): void {
    this.live = [1];
    this.upper = [new Accumulator()];
    this.cond = [new Accumulator()];
    this.block = [new Accumulator()];
    this.reached = 0;
    this.frontier = new Float64Array(this.s).fill(1);
  }

  private ensureDepth(depth: number): void {
    while (this.bStack.length <= depth) {
      this.bStack.push(new Float64Array(this.s));
      this.cStack.push(new Float64Array(this.s));
      this.pStack.push(new Float64Array(this.k));
    }
    while (this.live.length <= depth) {
      this.live.push(0);
      this.upper.push(new Accumulator());
      this.cond.push(new Accumulator());
      this.block.push(new Accumulator());
    }
    if (this.nextChild.length <= depth) this.nextChild = new Int32Array(2 * depth + 1);
  }

  /** Node of length t with vector bStack[t]: adds its children's terms to level t + 1. O(s² + s·k). */
  private expand(t: number): void {
    const { s, k, Pd, mu, muB } = this;
    this.expansions++;
    const b = this.bStack[t];
    const c = this.cStack[t];
    for (let i = 0; i < s; i++) {
      let acc = 0;
      const row = i * s;
      for (let j = 0; j < s; j++) acc += Pd[row + j] * b[j];
      c[i] = acc;
    }
    const condAcc = this.cond[t + 1];
    for (let i = 0; i < s; i++) {
      const ci = c[i];
      if (ci > 0 && mu[i] > 0) condAcc.add(-mu[i] * ci * Math.log2(ci));
    }
    const p = this.pStack[t];
    let mass = 0;
    for (let y = 0; y < k; y++) {
      let acc = 0;
      const off = y * s;
      for (let i = 0; i < s; i++) acc += muB[off + i] * c[i];
      p[y] = acc;
      mass += acc;
    }
    if (!(mass > 0)) {
      p.fill(0);
      return;
    }
    // Normalising by the children's own total keeps H(Y_1 | Y_2^{t+1}) a true conditional entropy.
    const logMass = Math.log2(mass);
    const up = this.upper[t + 1];
    const bl = this.block[t + 1];
    let children = 0;
    for (let y = 0; y < k; y++) {
      const py = p[y];
      if (!(py > 0)) continue;
      children++;
      const lr = Math.log2(py / mass);
      up.add(-py * lr);
      bl.add(-py * (lr + logMass));
    }
    this.live[t + 1] += children;
  }

  /**
   * Extends the figures from level `reached` to level `depth` by walking below every frontier
   * string (an explicit stack, so depth is not limited by the call stack). Keeps the new frontier
   * if it has at most FRONTIER_CAP strings. Requires a frontier and depth > reached.
   */
  extendTo(depth: number): void {
    const frontier = this.frontier;
    if (!frontier || depth <= this.reached) throw new Error("StringWalker.extendTo: nothing to extend");
    const { s, k, bT } = this;
    const from = this.reached;
    this.ensureDepth(depth);
    const nextChild = this.nextChild;
    let kept: number[] | null = [];
    for (let f = 0; f * s < frontier.length; f++) {
      this.bStack[from].set(frontier.subarray(f * s, (f + 1) * s));
      nextChild[from] = 0;
      this.expand(from);
      let t = from;
      while (t >= from) {
        const p = this.pStack[t];
        const c = this.cStack[t];
        if (t + 1 >= depth) {
          // Children are at the target depth: already counted by expand(t); keep them as the frontier.
          if (kept) {
            for (let y = 0; y < k; y++) {
              if (!(p[y] > 0)) continue;
              if (kept.length >= FRONTIER_CAP * s) {
                kept = null;
                break;
              }
              for (let i = 0; i < s; i++) kept.push(bT[y * s + i] * c[i]);
            }
          }
          t--;
          continue;
        }
        let y = nextChild[t];
        while (y < k && !(p[y] > 0)) y++;
        if (y >= k) {
          t--;
          continue;
        }
        nextChild[t] = y + 1;
        const child = this.bStack[t + 1];
        const off = y * s;
        for (let i = 0; i < s; i++) child[i] = bT[off + i] * c[i];
        t++;
        nextChild[t] = 0;
        this.expand(t);
      }
    }
    this.reached = depth;
    this.frontier = kept ? Float64Array.from(kept) : null;
  }
}

/**
 * Exact sandwich bounds on the entropy rate of a hidden Markov source, in bits per symbol:
 * upper_n = H(Y_n | Y^{n−1}) = H(Yⁿ) − H(Yⁿ⁻¹) and lower_n = H(Y_n | Y^{n−1}, X_1), for
 * n = 1 … N (Birch 1962; both monotone with the entropy rate as common limit). The work is exact
 * enumeration of the output strings of positive probability, depth first with shared prefixes, one
 * s-vector per string, s² + 2sk multiply-adds per string expanded; N is the largest n ≤ maxN
 * (default 40) reachable within workBudget (default 5e7). Before each pass its cost is bounded from
 * the string counts already known (a string has at most as many continuations as there are symbols
 * of positive probability), so the budget is never overrun. A source whose strings are pruned
 * heavily gets further passes that resume from the deepest level (or, if that level had more than
 * 65536 strings, restart from the root); `work` counts every pass.
 * Also returns H(Yⁿ) per level (`blockEntropyBits[n − 1]`) and notes on any rounding clamp.
 * Throws HiddenSourceError for mismatched shapes, negative or non-finite entries, μ not a stationary
 * probability vector of P (within 1e−6), maxN not an integer in 1 … MAX_BOUNDS_N, or a budget below
 * the cost of n = 1; throws BoundsInvariantError if lower exceeds upper by more than 1e−12 (a bug).
 */
export function hiddenSourceBounds(
  P: DenseMatrix,
  B: EmissionMatrix,
  mu: Float64Array,
  opts: { maxN?: number; workBudget?: number } = {},
): { bounds: HiddenBound[]; n: number; work: number; budget: number; blockEntropyBits: number[]; notes: string[] } {
  const { s, k } = checkSource(P, B, mu);
  const maxN = opts.maxN ?? 40;
  const budget = opts.workBudget ?? 5e7;
  if (!Number.isSafeInteger(maxN) || maxN < 1 || maxN > MAX_BOUNDS_N) {
    throw new HiddenSourceError(`maxN must be an integer in 1 … ${MAX_BOUNDS_N}, got ${String(maxN)}`);
  }
  if (!(budget > 0) || !Number.isFinite(budget)) throw new HiddenSourceError(`workBudget must be a positive finite number, got ${String(budget)}`);
  const walker = new StringWalker(P, B, mu);
  const unitCost = walker.unitCost;
  if (unitCost > budget) throw new HiddenSourceError(`workBudget ${budget} is below the cost of n = 1 (${unitCost})`);

  // Symbols of positive marginal probability bound the branching of every string.
  let branching = 0;
  for (let y = 0; y < k; y++) {
    let q = 0;
    for (let i = 0; i < s; i++) q += mu[i] * B.data[i * k + y];
    if (q > 0) branching++;
  }
  branching = Math.max(branching, 1);

  let work = 0;
  while (walker.reached < maxN) {
    const reached = walker.reached;
    const resume = walker.frontier !== null;
    // Cost of a pass to depth d: one expansion per live string of length < d (from `reached` when
    // resuming, from 0 when restarting), counts beyond `reached` bounded by the branching.
    let cost = 0;
    if (!resume) for (let t = 0; t < reached; t++) cost += walker.live[t] * unitCost;
    let strings = walker.live[reached];
    let best = reached;
    for (let d = reached + 1; d <= maxN; d++) {
      cost += strings * unitCost;
      if (work + cost > budget) break;
      best = d;
      strings *= branching;
    }
    if (best <= reached) break;
    const before = walker.expansions;
    if (!resume) walker.restart();
    walker.extendTo(best);
    work += (walker.expansions - before) * unitCost;
  }
  if (walker.reached === 0) throw new HiddenSourceError(`workBudget ${budget} is below the cost of n = 1 (${unitCost})`);

  const N = walker.reached;
  const h1GivenX = new Accumulator(); // H(Y_1 | X_1) = Σ μ_i H(B_i)
  for (let i = 0; i < s; i++) {
    for (let y = 0; y < k; y++) {
      const v = B.data[i * k + y];
      if (v > 0 && mu[i] > 0) h1GivenX.add(-mu[i] * v * Math.log2(v));
    }
  }
  const bounds: HiddenBound[] = [];
  const blockEntropyBits: number[] = [];
  const notes: string[] = [];
  let prevCond = 0;
  for (let n = 1; n <= N; n++) {
    let upper = walker.upper[n].value();
    const condN = walker.cond[n].value();
    // lower_n = H(Yⁿ | X_1) − H(Yⁿ⁻¹ | X_1) = cond[n] − cond[n − 1] for n ≥ 2.
    let lower = n === 1 ? h1GivenX.value() : condN - prevCond;
    prevCond = condN;
    blockEntropyBits.push(walker.block[n].value());
    if (lower < 0) {
      if (lower < -BOUNDS_ROUNDING_SLACK) throw new BoundsInvariantError(`lower bound at n = ${n} is ${lower} < 0`);
      lower = 0;
    }
    if (upper < 0) upper = 0; // a sum of non-negative terms; only −0 can occur
    if (lower > upper) {
      const excess = lower - upper;
      if (excess > BOUNDS_ROUNDING_SLACK) {
        throw new BoundsInvariantError(`bounds crossed at n = ${n}: lower ${lower} exceeds upper ${upper} by ${excess}`);
      }
      notes.push(`n = ${n}: lower exceeded upper by ${excess.toExponential(2)} (rounding); clamped to upper`);
      lower = upper;
    }
    bounds.push({ n, lower, upper });
  }
  return { bounds, n: N, work, budget, blockEntropyBits, notes };
}

/**
 * The t with P(|T| ≤ t) = level for Student's t with `df` degrees of freedom (so level 0.95 gives
 * the 97.5% point). Exact for df ≤ 1000: bisection on θ in the finite series for P(|T| ≤ √df·tan θ)
 * (Abramowitz and Stegun 26.7.3–26.7.4). Above that, the Cornish–Fisher expansion about the normal
 * quantile (A&S 26.7.5), whose first omitted term is below 1e−12 there. O(min(df, 1000)·60).
 * Throws HiddenSourceError if df is not a positive integer or level is not in (0, 1).
 */
export function studentTTwoSidedQuantile(level: number, df: number): number {
  if (!Number.isSafeInteger(df) || df < 1) throw new HiddenSourceError(`degrees of freedom must be a positive integer, got ${String(df)}`);
  if (!(level > 0 && level < 1)) throw new HiddenSourceError(`level must lie in (0, 1), got ${String(level)}`);
  if (df > 1000) {
    const z = normalTwoSidedQuantile(level);
    const z2 = z * z;
    return (
      z +
      (z * (z2 + 1)) / (4 * df) +
      (z * (5 * z2 * z2 + 16 * z2 + 3)) / (96 * df ** 2) +
      (z * (3 * z2 ** 3 + 19 * z2 * z2 + 17 * z2 - 15)) / (384 * df ** 3)
    );
  }
  let lo = 0;
  let hi = Math.PI / 2;
  for (let it = 0; it < 200 && hi - lo > 1e-16; it++) {
    const mid = (lo + hi) / 2;
    if (studentTCentralProbability(mid, df) < level) lo = mid;
    else hi = mid;
  }
  return Math.sqrt(df) * Math.tan((lo + hi) / 2);
}

/**
 * P(|T| ≤ √df·tan θ) for Student's t with integer df ≥ 1 and 0 ≤ θ ≤ π/2 (A&S 26.7.3–26.7.4).
 * O(df). Never throws; the caller keeps df and θ in range.
 */
export function studentTCentralProbability(theta: number, df: number): number {
  const sin = Math.sin(theta);
  const cos = Math.cos(theta);
  const c2 = cos * cos;
  if (df % 2 === 0) {
    let term = 1;
    let sum = 1;
    for (let j = 1; j <= (df - 2) / 2; j++) {
      term *= ((2 * j - 1) / (2 * j)) * c2;
      sum += term;
    }
    return sin * sum;
  }
  if (df === 1) return (2 / Math.PI) * theta;
  let term = 1;
  let sum = 1;
  for (let j = 1; j <= (df - 3) / 2; j++) {
    term *= ((2 * j) / (2 * j + 1)) * c2;
    sum += term;
  }
  return (2 / Math.PI) * (theta + sin * cos * sum);
}

/**
 * erf(x) for x ≥ 0 from its all-positive series (2/√π) e^{−x²} Σ 2ⁿ x^{2n+1} / (1·3···(2n+1))
 * (A&S 7.1.6), exact to rounding for the moderate x used here. O(x² + 40).
 */
function erfSeries(x: number): number {
  let term = x;
  let sum = x;
  for (let n = 1; n < 2000 && term > sum * 1e-17; n++) {
    term *= (2 * x * x) / (2 * n + 1);
    sum += term;
  }
  return (2 / Math.sqrt(Math.PI)) * Math.exp(-x * x) * sum;
}

/** The z with P(|Z| ≤ z) = level for a standard normal Z, by bisection on erf(z/√2). O(60·(z² + 40)). */
function normalTwoSidedQuantile(level: number): number {
  let lo = 0;
  let hi = 40;
  for (let it = 0; it < 200 && hi - lo > 1e-15 * hi; it++) {
    const mid = (lo + hi) / 2;
    if (erfSeries(mid / Math.SQRT2) < level) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Monte Carlo estimate of the entropy rate of a hidden Markov source in bits per symbol:
 * −(1/n) log₂ p(Yⁿ) on `runs` independent sample paths of length n (Shannon–McMillan–Breiman;
 * Algoet and Cover 1988), each path started from μ and drawn with one seeded generator, run after
 * run. p(Yⁿ) comes from the scaled forward algorithm (normalise the filter each step and add the
 * logs of the scales), so long paths do not underflow. Each run's value is unbiased for H(Yⁿ)/n,
 * which exceeds the rate by O(1/n). The 95% interval is mean ± t·SE with SE the sample standard
 * deviation across runs over √runs and t the Student-t 97.5% point with runs − 1 degrees of freedom.
 * O(runs · n · (s² + log(s·k))). Throws HiddenSourceError for mismatched shapes, μ not stationary,
 * length not a positive integer, runs not an integer ≥ 2, a seed that is not a safe integer, or
 * forward-recursion underflow (a filter that lost every state able to emit the observed symbol).
 */
export function hiddenMonteCarlo(
  P: DenseMatrix,
  B: EmissionMatrix,
  mu: Float64Array,
  opts: { length: number; runs: number; seed: number },
): { estimateBits: number; standardError: number; ci95: [number, number]; length: number; runs: number; seed: number } {
  const { s, k } = checkSource(P, B, mu);
  const { length, runs, seed } = opts;
  if (!Number.isSafeInteger(length) || length <= 0) throw new HiddenSourceError(`length must be a positive integer, got ${String(length)}`);
  if (!Number.isSafeInteger(runs) || runs < 2) throw new HiddenSourceError(`runs must be an integer ≥ 2, got ${String(runs)}`);
  if (!Number.isSafeInteger(seed)) throw new HiddenSourceError(`seed must be a safe integer, got ${String(seed)}`);
  const rng = createRng(seed);
  const Pd = P.data;
  const Bd = B.data;
  const alpha = new Float64Array(s);
  const next = new Float64Array(s);
  const perRun = new Float64Array(runs);
  for (let r = 0; r < runs; r++) {
    const { symbols } = sampleHiddenPath(P, B, mu, length, rng);
    const logP = new Accumulator();
    for (let t = 0; t < length; t++) {
      const y = symbols[t];
      if (t === 0) {
        for (let j = 0; j < s; j++) next[j] = mu[j] * Bd[j * k + y];
      } else {
        for (let j = 0; j < s; j++) next[j] = 0;
        for (let i = 0; i < s; i++) {
          const a = alpha[i];
          if (a === 0) continue;
          const row = i * s;
          for (let j = 0; j < s; j++) next[j] += a * Pd[row + j];
        }
        for (let j = 0; j < s; j++) next[j] *= Bd[j * k + y];
      }
      let scale = 0;
      for (let j = 0; j < s; j++) scale += next[j];
      if (!(scale > 0)) {
        throw new HiddenSourceError(`forward recursion underflowed at step ${t + 1} of run ${r + 1}; the source is too close to degenerate for this estimate`);
      }
      for (let j = 0; j < s; j++) alpha[j] = next[j] / scale;
      logP.add(Math.log2(scale));
    }
    perRun[r] = -logP.value() / length;
  }
  const mean = compensatedSum(perRun) / runs;
  const dev = new Float64Array(runs);
  for (let r = 0; r < runs; r++) dev[r] = (perRun[r] - mean) ** 2;
  const sd = Math.sqrt(compensatedSum(dev) / (runs - 1));
  const standardError = sd / Math.sqrt(runs);
  const half = studentTTwoSidedQuantile(0.95, runs - 1) * standardError;
  return { estimateBits: mean, standardError, ci95: [mean - half, mean + half], length, runs, seed };
}
