/**
 * Verification: every published figure recomputed by a second, independent route, with both values,
 * the difference and the tolerance. A failed check makes the record fail; assertVerified turns that
 * into an error, so a figure that fails its check is never published.
 *
 * Routes (route 1 is always the published value):
 * - i.i.d.: closed forms vs the general Markov formula on the chain whose rows all equal p; min-entropy
 *   vs Karp on that chain (≤ KARP_LIMIT symbols) or the Rényi-limit bound; Rényi vs a power iteration.
 * - chains: μ by GTH forward vs GTH in reverse elimination order (dense), by Gauss–Seidel vs a second
 *   Gauss–Seidel run from another start (sparse), or closed form vs solver (two-state, graph walk;
 *   for a sparse graph walk the solver is detailed balance along a spanning tree of P, O(n + nnz),
 *   with Gauss–Seidel as the fallback if balance does not hold); the entropy rate vs the general
 *   formula under the second μ; min-entropy Karp vs Howard up to KARP_LIMIT states, above it Howard
 *   vs the Rényi-limit bound, and a closed form (graph walk) vs Karp or Howard; Rényi vs the
 *   Collatz–Wielandt bracket.
 * - hidden: μ by GTH both ways; the sandwich bounds must be ordered and monotone; the Monte Carlo
 *   95% interval must overlap [lower_N, upper_N].
 *
 * The Rényi-limit bound: with c the maximum mean cycle of ln P and d the largest out-degree,
 * α·c ≤ ln ρ([Pᵢⱼ^α]) ≤ α·c + ln d (the lower bound is any critical cycle; the upper one follows
 * from scaling by the max-plus eigenvector, under which every entry is ≤ e^{αc}). Hence the
 * min-entropy rate −c lies in [−U/α, (−L + ln d)/α] for any bracket [L, U] of ln ρ; α = 32.
 */
import type { DenseMatrix, SparseMatrix } from "./types";
import { DEFAULT_TOLERANCE, LN2, allowedDifference, closeTo, type Tolerance } from "./numeric";
import { EngineInputError, VerificationError } from "./errors";
import { ENGINE_VERSION } from "./version";
import { parseModel } from "./validate";
import { denseToSparse, restrictDense } from "./sparse";
import { stationaryGTH, stationaryIterative, stationaryResidual, stationaryReversible } from "./stationary";
import { entropyRateGeneral } from "./entropy-rate";
import { minEntropyRateHoward, minEntropyRateKarp } from "./min-entropy";
import { studentTTwoSidedQuantile } from "./hidden";
import {

  ITERATIVE_MAX_ITERATIONS,
  ITERATIVE_TOLERANCE,
  KARP_LIMIT,
  classMatrix,
  computeUnverified,
  denseFromRows,
  prepareChain,
  requireValidRequest,
  type PreparedChain,
  solveStationary,
  type ClosedClassFigures,
  type UnverifiedResult,
} from "./compute";
import type { ValidComputeRequest } from "./validate";

/** One way of computing a figure. */
export interface VerificationRoute {
  method: string;
  value: number;
}

/** One figure checked by two routes. */
export interface VerificationCheck {
  figure: string;
  routes: [VerificationRoute, VerificationRoute];
  /** equal: |a − b|; within: distance of route 1 outside `interval`; at most: a − b if positive; overlap: gap between intervals. */
  difference: number;
  tolerance: Tolerance;
  relation: "equal" | "within" | "at most" | "overlap";
  /** The interval route 2 establishes (within / overlap). */
  interval?: [number, number];
  passed: boolean;
}

/** The verification record stored with an edition. */
export interface VerificationRecord {
  engineVersion: string;
  passed: boolean;
  checks: VerificationCheck[];
}

/** Tolerance for μ and rates from GTH (both routes exact up to rounding). */
const DIRECT_TOLERANCE: Tolerance = DEFAULT_TOLERANCE;
/** Tolerance when a route is iterative (stopped at ‖μP − μ‖₁ ≤ 1e-12; common practice, no source). */
const ITERATIVE_CHECK_TOLERANCE: Tolerance = { abs: 1e-8, rel: 1e-8 };
/** Largest ‖μP − μ‖₁ accepted for a published μ. */
export const RESIDUAL_LIMIT = 1e-9;
/** Rényi order used for the min-entropy limit bound. */
export const LIMIT_BOUND_ORDER = 32;
/** Work budget (entry operations) of one verification bracket of a Perron root. */
export const BRACKET_WORK_BUDGET = 6e7;
/**
 * Largest relative detailed-balance defect under which the spanning-tree μ of a graph walk is used as
 * its second route (rounding along tree paths stays far below it; common practice, no source).
 */
const BALANCE_LIMIT = 1e-9;
/** Alphabet up to which the i.i.d. general-formula route builds the matrix explicitly. */
const IID_MATRIX_LIMIT = 1024;

function equal(figure: string, a: VerificationRoute, b: VerificationRoute, tol: Tolerance = DIRECT_TOLERANCE): VerificationCheck {
  return { figure, routes: [a, b], difference: Math.abs(a.value - b.value), tolerance: tol, relation: "equal", passed: closeTo(a.value, b.value, tol) };
}

function within(figure: string, a: VerificationRoute, method: string, lo: number, hi: number, tol: Tolerance = DIRECT_TOLERANCE): VerificationCheck {
  const difference = Math.max(0, lo - a.value, a.value - hi);
  const ok = Number.isFinite(lo) && Number.isFinite(hi) && difference <= allowedDifference(a.value, a.value, tol);
  return {
    figure,
    routes: [a, { method, value: (lo + hi) / 2 }],
    difference,
    tolerance: tol,
    relation: "within",
    interval: [lo, hi],
    passed: ok,
  };
}

function atMost(figure: string, a: VerificationRoute, limit: VerificationRoute): VerificationCheck {
  const tol = { abs: 0, rel: 0 };
  return { figure, routes: [a, limit], difference: Math.max(0, a.value - limit.value), tolerance: tol, relation: "at most", passed: a.value <= limit.value };
}

function vectorEqual(figure: string, m1: string, a: ArrayLike<number>, m2: string, b: ArrayLike<number>, tol: Tolerance): VerificationCheck {
  let worst = 0;
  let diff = a.length === b.length ? 0 : Infinity;
  let ok = a.length === b.length;
  for (let i = 0; i < Math.min(a.length, b.length); i++) {
    const d = Math.abs(a[i] - b[i]);
    if (!closeTo(a[i], b[i], tol)) ok = false;
    if (d > diff) {
      diff = d;
      worst = i;
    }
  }
  return {
    figure: `${figure}[${worst}]`,
    routes: [
      { method: m1, value: a[worst] ?? 0 },
      { method: m2, value: b[worst] ?? 0 },
    ],
    difference: Number.isFinite(diff) ? diff : Number.MAX_VALUE,
    tolerance: tol,
    relation: "equal",
    passed: ok,
  };
}

type Apply = (x: Float64Array, y: Float64Array) => void;

/**
 * A bracket [ln lo, ln hi] of the Perron root of a nonnegative irreducible operator by power
 * iteration on I + A/ρ̂ (ρ̂ the running estimate, so periodic matrices converge), bounded by the
 * Collatz–Wielandt inequalities min (Ax)ᵢ/xᵢ ≤ ρ ≤ max (Ax)ᵢ/xᵢ, which hold for every positive x.
 * Stopping early only widens the bracket (it stays valid), so the iteration is capped by a work
 * budget: at most BRACKET_WORK_BUDGET/work iterations (at least 20). O(work) per iteration.
 */
function perronLogBracket(n: number, apply: Apply, work: number): { lower: number; upper: number } {
  const x = new Float64Array(n).fill(1);
  const y = new Float64Array(n);
  let lo = 0;
  let hi = Infinity;
  const maxIter = Math.max(20, Math.min(20_000, Math.floor(BRACKET_WORK_BUDGET / Math.max(1, work))));
  for (let it = 0; it < maxIter; it++) {
    apply(x, y);
    let l = Infinity;
    let h = 0;
    for (let i = 0; i < n; i++) {
      const r = y[i] / x[i];
      if (r < l) l = r;
      if (r > h) h = r;
    }
    if (l > lo) lo = l;
    if (h < hi) hi = h;
    if (hi - lo <= 1e-14 * hi) break;
    const est = (lo + hi) / 2;
    let mx = 0;
    for (let i = 0; i < n; i++) {
      x[i] += y[i] / est;
      if (x[i] > mx) mx = x[i];
    }
    for (let i = 0; i < n; i++) x[i] = Math.max(x[i] / mx, 1e-300);
  }
  return { lower: Math.log(lo), upper: Math.log(hi) };
}

/** ln ρ([Pᵢⱼ^α]) bracket for a class matrix; entries are scaled by max P so large α does not underflow. */
function logRootOfPower(M: DenseMatrix | SparseMatrix, alpha: number): { lower: number; upper: number; maxDegree: number } {
  const S = "data" in M ? denseToSparse(M) : M;
  let lmax = -Infinity;
  for (let p = 0; p < S.val.length; p++) if (S.val[p] > 0) lmax = Math.max(lmax, Math.log(S.val[p]));
  const a = Float64Array.from(S.val, (v) => (v > 0 ? Math.exp(alpha * (Math.log(v) - lmax)) : 0));
  let maxDegree = 0;
  for (let i = 0; i < S.n; i++) {
    let d = 0;
    for (let p = S.rowPtr[i]; p < S.rowPtr[i + 1]; p++) if (S.val[p] > 0) d++;
    maxDegree = Math.max(maxDegree, d);
  }
  const { n, rowPtr, col } = S;
  const apply: Apply = (x, y) => {
    for (let i = 0; i < n; i++) {
      let s = 0;
      const end = rowPtr[i + 1];
      for (let p = rowPtr[i]; p < end; p++) s += a[p] * x[col[p]];
      y[i] = s;
    }
  };
  const b = perronLogBracket(S.n, apply, S.val.length + S.n);
  return { lower: b.lower + alpha * lmax, upper: b.upper + alpha * lmax, maxDegree };
}

/** Rényi rate (bits) bracket from a ln ρ bracket: (1/(1−α)) ln ρ / ln 2, endpoints swapped for α > 1. */
function renyiBitsInterval(lower: number, upper: number, alpha: number): [number, number] {
  const x = lower / ((1 - alpha) * LN2);
  const y = upper / ((1 - alpha) * LN2);
  return x <= y ? [x, y] : [y, x];
}

function renyiChecks(prefix: string, fig: ClosedClassFigures, bracket: (alpha: number) => { lower: number; upper: number }): VerificationCheck[] {
  return fig.renyi.map((r, t) => {
    const b = bracket(r.order);
    const [lo, hi] = renyiBitsInterval(b.lower, b.upper, r.order);
    return within(`${prefix}renyi[${t}].bits (α = ${r.order})`, { method: "Perron root of [Pᵢⱼ^α] (published)", value: r.bits }, "Collatz–Wielandt bracket of a separate power iteration", lo, hi);
  });
}

function minEntropyLimitCheck(figure: string, published: VerificationRoute, bracket: { lower: number; upper: number }, maxDegree: number): VerificationCheck {
  const a = LIMIT_BOUND_ORDER;
  const lo = -bracket.upper / a / LN2;
  const hi = (-bracket.lower + Math.log(maxDegree)) / a / LN2;
  return within(figure, published, `Rényi-rate limit bound at α = ${a}`, lo, hi);
}

function chainClassChecks(prefix: string, fig: ClosedClassFigures, M: DenseMatrix | SparseMatrix): VerificationCheck[] {
  const checks: VerificationCheck[] = [];
  const mu1 = fig.stationary;
  const closedForm = fig.solver.method.startsWith("closed form");
  const dense = "data" in M;
  let mu2: Float64Array;
  let m2: string;
  let tol: Tolerance;
  const balanced = closedForm && !dense ? stationaryReversible(M) : null;
  if (balanced && balanced.balanceDefect <= BALANCE_LIMIT) {
    mu2 = balanced.mu;
    m2 = "detailed balance along a spanning tree of P";
    tol = DIRECT_TOLERANCE;
  } else if (closedForm) {
    const s = solveStationary(M);
    mu2 = s.mu;
    m2 = s.solver.method;
    tol = dense ? DIRECT_TOLERANCE : ITERATIVE_CHECK_TOLERANCE;
  } else if (dense) {
    mu2 = M.n === 1 ? new Float64Array([1]) : stationaryGTH(M, { order: "reverse" });
    m2 = "GTH state reduction, reverse elimination order";
    tol = DIRECT_TOLERANCE;
  } else {
    // A second Gauss–Seidel run from a deterministic, uneven start vector.
    const initial = Float64Array.from({ length: M.n }, (_, i) => 1 + ((i * 7919) % 13));
    mu2 = stationaryIterative(M, { tolerance: ITERATIVE_TOLERANCE, maxIterations: ITERATIVE_MAX_ITERATIONS, initial }).mu;
    m2 = "symmetric Gauss–Seidel from a second start vector";
    tol = ITERATIVE_CHECK_TOLERANCE;
  }
  checks.push(vectorEqual(`${prefix}stationary`, fig.solver.method, mu1, m2, mu2, tol));
  checks.push(atMost(`${prefix}solver.residual`, { method: "‖μP − μ‖₁ of the published μ", value: stationaryResidual(M, mu1) }, { method: "limit", value: RESIDUAL_LIMIT }));
  const general = entropyRateGeneral(M, mu2);
  const m1 = closedForm ? fig.solver.method : "general formula under the published μ";
  checks.push(equal(`${prefix}entropyRate.bits`, { method: m1, value: fig.entropyRate.bits }, { method: `general formula under μ from ${m2}`, value: general.bits }, tol));
  checks.push(equal(`${prefix}entropyRate.nats`, { method: m1, value: fig.entropyRate.nats }, { method: `general formula under μ from ${m2}`, value: general.nats }, tol));
  if (fig.minEntropyRate) {
    const pub = { method: `${fig.minEntropyMethod} (published)`, value: fig.minEntropyRate.bits };
    if (fig.minEntropyMethod === "Karp") {
      checks.push(equal(`${prefix}minEntropyRate.bits`, pub, { method: "Howard policy iteration", value: minEntropyRateHoward(M).rate.bits }));
    } else if (fig.minEntropyMethod?.startsWith("closed form")) {
      const second = M.n <= KARP_LIMIT ? { method: "Karp", value: minEntropyRateKarp(M).bits } : { method: "Howard policy iteration", value: minEntropyRateHoward(M).rate.bits };
      checks.push(equal(`${prefix}minEntropyRate.bits`, pub, second));
    } else {
      const b = logRootOfPower(M, LIMIT_BOUND_ORDER);
      checks.push(minEntropyLimitCheck(`${prefix}minEntropyRate.bits`, pub, b, b.maxDegree));
    }
  }
  checks.push(...renyiChecks(prefix, fig, (alpha) => logRootOfPower(M, alpha)));
  return checks;
}

function blockChecks(result: UnverifiedResult, order: number): VerificationCheck[] {
  const blocks = result.blockEntropies;
  if (!result.entropyRate || blocks.length === 0 || result.family === "hidden") return [];
  const last = blocks[blocks.length - 1];
  if (last.n <= order) return [];
  // For n > k the Markov property makes H(Xₙ | Xⁿ⁻¹) the entropy rate itself.
  return [
    equal(
      `blockEntropies[${blocks.length - 1}].conditional`,
      { method: `H(X${last.n} | X^${last.n - 1}) from block entropies`, value: last.conditional },
      { method: "entropy rate", value: result.entropyRate.bits },
    ),
  ];
}

function iidChecks(req: ValidComputeRequest, result: UnverifiedResult): VerificationCheck[] {
  const m = req.model as Extract<ValidComputeRequest["model"], { family: "iid" }>;
  const p = m.p.filter((x) => x > 0);
  const k = p.length;
  const checks: VerificationCheck[] = [];
  const H = result.entropyRate!;
  let general: { bits: number; nats: number };
  let method: string;
  if (k <= IID_MATRIX_LIMIT) {
    general = entropyRateGeneral(denseFromRows(Array.from({ length: k }, () => p)), p);
    method = "general formula −Σ μᵢ Pᵢⱼ log Pᵢⱼ on the chain with every row p";
  } else {
    // The same formula row by row, without materialising k² entries.
    let bits = 0;
    for (let i = 0; i < k; i++) {
      let row = 0;
      for (let j = 0; j < k; j++) row -= p[j] * Math.log2(p[j]);
      bits += p[i] * row;
    }
    general = { bits, nats: bits * LN2 };
    method = "general formula −Σ μᵢ Pᵢⱼ log Pᵢⱼ, row by row";
  }
  checks.push(equal("entropyRate.bits", { method: "closed form H(p)", value: H.bits }, { method, value: general.bits }));
  checks.push(equal("entropyRate.nats", { method: "closed form H(p)", value: H.nats }, { method, value: general.nats }));
  const pmax = Math.max(...p);
  const minPub = { method: "closed form −log₂ max pᵢ", value: result.minEntropyRate!.bits };
  const rankOne = (alpha: number) => {
    const a = Float64Array.from(p, (x) => (x / pmax) ** alpha);
    const apply: Apply = (x, y) => {
      let s = 0;
      for (let j = 0; j < k; j++) s += a[j] * x[j];
      y.fill(s);
    };
    const b = perronLogBracket(k, apply, k);
    return { lower: b.lower + alpha * Math.log(pmax), upper: b.upper + alpha * Math.log(pmax) };
  };
  if (k <= KARP_LIMIT) {
    const Pm = denseFromRows(Array.from({ length: k }, () => p));
    checks.push(equal("minEntropyRate.bits", minPub, { method: "Karp on the chain with every row p", value: minEntropyRateKarp(Pm).bits }));
  } else checks.push(minEntropyLimitCheck("minEntropyRate.bits", minPub, rankOne(LIMIT_BOUND_ORDER), k));
  const fig = result.closedClasses[0];
  checks.push(...renyiChecks("", { ...fig, renyi: result.renyi }, rankOne).map((c) => ({ ...c, routes: [{ ...c.routes[0], method: "closed form (1/(1−α)) log₂ Σ pᵢ^α" }, c.routes[1]] as [VerificationRoute, VerificationRoute] })));
  return checks;
}

function hiddenChecks(req: ValidComputeRequest, result: UnverifiedResult): VerificationCheck[] {
  const m = req.model as Extract<ValidComputeRequest["model"], { family: "hidden" }>;
  const P = denseFromRows(m.P);
  const checks: VerificationCheck[] = [];
  const several = result.closedClasses.length > 1;
  for (const [t, fig] of result.closedClasses.entries()) {
    const prefix = several ? `closedClasses[${t}].` : "";
    const Pc = restrictDense(P, fig.states);
    const mu2 = Pc.n === 1 ? new Float64Array([1]) : stationaryGTH(Pc, { order: "reverse" });
    checks.push(vectorEqual(`${prefix}stationary`, fig.solver.method, fig.stationary, "GTH state reduction, reverse elimination order", mu2, DIRECT_TOLERANCE));
    const bounds = (several ? fig.bounds : result.bounds) ?? [];
    checks.push(boundsOrderCheck(`${prefix}bounds`, bounds));
  }
  if (!several && result.monteCarlo && result.bounds && result.bounds.length > 0) {
    const last = result.bounds[result.bounds.length - 1];
    // The check uses a 99.9% interval, not the reported 95% one: a verification that fails one
    // time in twenty by chance would refuse good editions (common practice, no source).
    const mc = result.monteCarlo;
    const half = studentTTwoSidedQuantile(0.999, mc.runs - 1) * mc.standardError;
    const [c0, c1] = [mc.estimateBits - half, mc.estimateBits + half];
    const gap = Math.max(0, c0 - last.upper, last.lower - c1);
    checks.push({
      figure: "entropyRate.bits",
      routes: [
        { method: `midpoint of the sandwich bounds at n = ${last.n}`, value: result.entropyRate!.bits },
        { method: `Monte Carlo estimate (seed ${result.monteCarlo.seed}, ${result.monteCarlo.runs} runs of ${result.monteCarlo.length}; 99.9% interval)`, value: result.monteCarlo.estimateBits },
      ],
      difference: gap,
      tolerance: { abs: 0, rel: 0 },
      relation: "overlap",
      interval: [c0, c1],
      passed: gap === 0,
    });
  }
  return checks;
}

function boundsOrderCheck(figure: string, bounds: { n: number; lower: number; upper: number }[]): VerificationCheck {
  // lower_n ≤ upper_n, lower non-decreasing, upper non-increasing (Birch 1962), up to rounding.
  const slack = 1e-12;
  let worst = 0;
  for (let i = 0; i < bounds.length; i++) {
    worst = Math.max(worst, bounds[i].lower - bounds[i].upper);
    if (i > 0) worst = Math.max(worst, bounds[i - 1].lower - bounds[i].lower, bounds[i].upper - bounds[i - 1].upper);
  }
  const last = bounds[bounds.length - 1];
  return {
    figure,
    routes: [
      { method: `lower bound H(Yₙ | Yⁿ⁻¹, X₁) at n = ${last?.n ?? 0}`, value: last?.lower ?? 0 },
      { method: `upper bound H(Yₙ | Yⁿ⁻¹) at n = ${last?.n ?? 0}`, value: last?.upper ?? 0 },
    ],
    difference: worst,
    tolerance: { abs: slack, rel: 0 },
    relation: "at most",
    passed: bounds.length > 0 && worst <= slack,
  };
}

function toRequest(input: unknown): ValidComputeRequest {
  if (input && typeof input === "object" && "model" in input) return requireValidRequest(input).value;
  const parsed = parseModel(input);
  if (!parsed.ok) throw new EngineInputError(parsed.error.message, parsed.error.issues);
  return { model: parsed.value };
}

/**
 * The verification record of a model (bare, or a compute request) and, optionally, the result to
 * check (computed here when absent). Cost: about one more computation of the model's figures.
 * Throws EngineInputError on invalid input and EngineNumericError if a second route's solver
 * rejects the chain.
 */
export function verifyFigures(input: unknown, result?: UnverifiedResult): VerificationRecord {
  const req = toRequest(input);
  return verifyValidated(req, result ?? computeUnverified(req));
}

/**
 * verifyFigures for a request that is already validated, with its result and, for chain families,
 * the chain prepareChain built for it (rebuilt here when absent). Cost and throws as verifyFigures,
 * without the second parse of the input.
 */
export function verifyValidated(req: ValidComputeRequest, r: UnverifiedResult, prepared?: PreparedChain | null): VerificationRecord {
  const checks: VerificationCheck[] = [];
  switch (req.model.family) {
    case "iid":
      checks.push(...iidChecks(req, r));
      break;
    case "hidden":
      checks.push(...hiddenChecks(req, r));
      break;
    default: {
      const chain = prepared ?? prepareChain(req.model).chain;
      const several = r.closedClasses.length > 1;
      r.closedClasses.forEach((fig, t) => checks.push(...chainClassChecks(several ? `closedClasses[${t}].` : "", fig, classMatrix(chain, fig.states))));
    }
  }
  const order = req.model.family === "iid" ? 0 : req.model.family === "markov" ? (req.model.order ?? 1) : 1;
  checks.push(...blockChecks(r, order));
  const clean = checks.map((c) => ({
    ...c,
    difference: Number.isFinite(c.difference) ? c.difference : Number.MAX_VALUE,
    routes: c.routes.map((x) => ({ ...x, value: Number.isFinite(x.value) ? x.value : 0 })) as [VerificationRoute, VerificationRoute],
    interval: c.interval?.map((v) => (Number.isFinite(v) ? v : v > 0 ? Number.MAX_VALUE : -Number.MAX_VALUE)) as [number, number] | undefined,
    passed: c.passed && c.routes.every((x) => Number.isFinite(x.value)),
  }));
  for (const c of clean) if (c.interval === undefined) delete c.interval;
  return { engineVersion: ENGINE_VERSION, passed: clean.length > 0 && clean.every((c) => c.passed), checks: clean };
}

/** Throws VerificationError listing every failing check; returns nothing when all pass. O(checks). */
export function assertVerified(record: VerificationRecord): void {
  if (record.passed && record.checks.length > 0 && record.checks.every((c) => c.passed)) return;
  const failed = record.checks.filter((c) => !c.passed);
  const list = failed.map((c) => `${c.figure}: ${c.routes[0].method} ${c.routes[0].value} vs ${c.routes[1].method} ${c.routes[1].value} (difference ${c.difference})`);
  throw new VerificationError(
    failed.length === 0 ? "verification failed: the record has no passing checks" : `verification failed for ${failed.length} check(s): ${list.join("; ")}`,
    failed.map((c) => ({ figure: c.figure, difference: c.difference, allowed: allowedDifference(c.routes[0].value, c.routes[1].value, c.tolerance) })),
  );
}

