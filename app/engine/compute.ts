/**
 * The compute orchestration: validated parameters in, every figure of the model out, as plain JSON
 * (decision note 0002), with a verification record (verification.ts) that recomputes each published
 * figure by a second route.
 */
import type { DenseMatrix, Rate, SparseMatrix } from "./types";
import { LN2, compensatedSum } from "./numeric";
import { EngineInputError } from "./errors";
import { ENGINE_VERSION } from "./version";
import type { Family, ModelParams } from "./schema";
import { labelResolver, labelText, parseComputeRequest, type ValidComputeRequest } from "./validate";
import { contextLabels, liftOrderK, symbolMarginal } from "./lift";
import { denseToSparse, restrictDense, sparseFromTriples, sparseToDense } from "./sparse";
import { classify, type Classification } from "./classify";
import { EngineNumericError, stationaryGTH, stationaryIterative, stationaryResidual } from "./stationary";
import { entropyRateGeneral, entropyRateIid, entropyRateTwoState, graphWalkClosedForm, graphWalkMatrix, type WeightedEdges } from "./entropy-rate";
import { blockEntropies, type BlockEntropy } from "./block-entropy";
import { prepareRenyi, prepareRenyiScaled, prepareReversibleRenyi, renyiEntropyRate, reversibleRenyiEntropyRate, reversibleRenyiFitsBudget, type RenyiPreparation, type ReversibleRenyiPreparation } from "./renyi";
import { howardMaxMeanCycle, minEntropyRateFromHoward, minEntropyRateKarp, reversibleMinEntropyRate } from "./min-entropy";
import { hiddenMonteCarlo, hiddenSourceBounds, type EmissionMatrix } from "./hidden";
import { verifyValidated, type VerificationRecord } from "./verification";

/** Classes up to this size are solved densely by GTH (O(n³/3): about a second at 1,024 states). */
export const GTH_LIMIT = 1024;
/** Classes up to this size get Karp's min-entropy (O(n·nnz)); above it Howard is published. */
export const KARP_LIMIT = 512;
/**
 * Work budget (entry operations) of one Rényi order's Perron root on the product path; an order not
 * obtained within it is left out with a note. Graph walks give half to the symmetric route first.
 */
export const RENYI_WORK_BUDGET = 1e8;
/** Rényi orders always reported, besides the requested ones. */
export const DEFAULT_RENYI_ORDERS = [0.5, 2, 4] as const;
/** Default longest block length for block entropies and hidden-source bounds. */
export const DEFAULT_BLOCK_LENGTHS = 12;
/** Default seed of the hidden-source Monte Carlo estimate. */
export const DEFAULT_SEED = 1;
/** Monte Carlo runs for hidden sources (the CI uses Student's t with runs − 1 degrees of freedom). */
export const MONTE_CARLO_RUNS = 200;
/** Tolerance and iteration cap of the iterative stationary solver. */
export const ITERATIVE_TOLERANCE = 1e-12;
export const ITERATIVE_MAX_ITERATIONS = 20_000;

/** A Rényi entropy rate of one order. */
export interface RenyiFigure {
  order: number;
  bits: number;
  nats: number;
}

/** One communicating class: state indices (into `states`), whether it is closed, its period. */
export interface ClassSummary {
  states: number[];
  closed: boolean;
  /** gcd of cycle lengths; 0 for a single state that cannot return to itself. */
  period: number;
}

/** How the stationary distribution was obtained. */
export interface SolverInfo {
  method: string;
  /** ‖μP − μ‖₁ of the published μ. */
  residual: number;
  iterations: number;
}

/** The figures of one closed class (the whole chain when irreducible). */
export interface ClosedClassFigures {
  /** Index into `classes`. */
  class: number;
  states: number[];
  labels: string[];
  /** The class's stationary distribution, in the order of `states`. */
  stationary: number[];
  period: number;
  entropyRate: Rate;
  minEntropyRate: Rate | null;
  minEntropyMethod: string | null;
  renyi: RenyiFigure[];
  solver: SolverInfo;
  /** Hidden sources: the class's sandwich bounds. */
  bounds?: { n: number; lower: number; upper: number }[];
}

/** The seeded Monte Carlo estimate of a hidden source's rate. */
export interface MonteCarloSummary {
  estimateBits: number;
  standardError: number;
  ci95: [number, number];
  length: number;
  runs: number;
  seed: number;
}

/** Everything computed for one model; plain JSON (finite numbers, no typed arrays). */
export interface ComputeResult {
  engineVersion: string;
  family: Family;
  /** State labels in the order of `stationary` (contexts "a·b" for order-k chains, nodes, hidden states). */
  states: string[];
  /** Output alphabet (Markov, i.i.d., two-state: the symbols; hidden: the emitted symbols). */
  symbols: string[];
  /** The unique stationary distribution; null when several closed classes make it non-unique. */
  stationary: number[] | null;
  /** Law of one emitted symbol under `stationary` (order-k chains, hidden sources); otherwise = stationary. */
  symbolDistribution: number[] | null;
  irreducible: boolean;
  /** Period of the (single) closed class; null with several closed classes. */
  period: number | null;
  classes: ClassSummary[];
  closedClasses: ClosedClassFigures[];
  entropyRate: Rate | null;
  minEntropyRate: Rate | null;
  renyi: RenyiFigure[];
  blockEntropies: BlockEntropy[];
  bounds?: { n: number; lower: number; upper: number }[];
  monteCarlo?: MonteCarloSummary;
  solver: SolverInfo;
  /** Present when there is no single entropy rate (several closed classes). */
  message?: string;
  notes: string[];
  verification: VerificationRecord;
}

/** A result before its verification record is attached. */
export type UnverifiedResult = Omit<ComputeResult, "verification">;

/** The chain the solvers see: always CSR, plus the dense form when the parameters were dense. */
export interface PreparedChain {
  n: number;
  sparse: SparseMatrix;
  dense: DenseMatrix | null;
}

function rate(bits: number): Rate {
  return { bits, nats: bits * LN2 };
}

function toNumbers(a: ArrayLike<number>): number[] {
  return Array.from(a, (x) => (Object.is(x, -0) ? 0 : x));
}

/** The Rényi orders to report: defaults plus requested, sorted, without repeats. O(k log k). */
export function renyiOrdersFor(requested: readonly number[] | undefined): number[] {
  return [...new Set([...DEFAULT_RENYI_ORDERS, ...(requested ?? [])])].sort((x, y) => x - y);
}

/** Dense row-major matrix from validated rows. O(n²). */
export function denseFromRows(rows: readonly (readonly number[])[]): DenseMatrix {
  const n = rows.length;
  const data = new Float64Array(n * n);
  for (let i = 0; i < n; i++) data.set(rows[i], i * n);
  return { n, data };
}

/** The submatrix of a CSR matrix on the given states (in that order). O(nnz of those rows + n). */
export function restrictSparse(P: SparseMatrix, states: readonly number[]): SparseMatrix {
  const pos = new Int32Array(P.n).fill(-1);
  states.forEach((s, k) => (pos[s] = k));
  const rowPtr = new Int32Array(states.length + 1);
  let nnz = 0;
  for (let k = 0; k < states.length; k++) {
    const s = states[k];
    for (let p = P.rowPtr[s]; p < P.rowPtr[s + 1]; p++) if (pos[P.col[p]] >= 0) nnz++;
    rowPtr[k + 1] = nnz;
  }
  const col = new Int32Array(nnz);
  const val = new Float64Array(nnz);
  let q = 0;
  for (let k = 0; k < states.length; k++) {
    const s = states[k];
    const start = q;
    for (let p = P.rowPtr[s]; p < P.rowPtr[s + 1]; p++) {
      const c = pos[P.col[p]];
      if (c >= 0) {
        col[q] = c;
        val[q] = P.val[p];
        q++;
      }
    }
    // Keep columns ascending within the row (the states of a class are given ascending, so this is a no-op then).
    if (q - start > 1) {
      const idx = Array.from({ length: q - start }, (_, t) => start + t).sort((x, y) => col[x] - col[y]);
      const c2 = idx.map((t) => col[t]);
      const v2 = idx.map((t) => val[t]);
      col.set(c2, start);
      val.set(v2, start);
    }
  }
  return { n: states.length, rowPtr, col, val };
}

/** The chain restricted to a class, dense when small enough for GTH. O(k²) or O(nnz). */
export function classMatrix(chain: PreparedChain, states: readonly number[]): DenseMatrix | SparseMatrix {
  const all = states.length === chain.n;
  if (states.length <= GTH_LIMIT) {
    if (chain.dense) return all ? chain.dense : restrictDense(chain.dense, [...states]);
    return sparseToDense(all ? chain.sparse : restrictSparse(chain.sparse, states));
  }
  return all ? chain.sparse : restrictSparse(chain.sparse, states);
}

/**
 * The stationary law of an irreducible class matrix: GTH (forward elimination) when dense,
 * symmetric Gauss–Seidel when sparse. O(k³/3) or O(nnz) per iteration.
 * Throws EngineNumericError from the solvers.
 */
export function solveStationary(M: DenseMatrix | SparseMatrix, initial?: Float64Array): { mu: Float64Array; solver: SolverInfo } {
  if ("data" in M) {
    const mu = stationaryGTH(M, { order: "forward" });
    return { mu, solver: { method: "GTH state reduction", residual: stationaryResidual(M, mu), iterations: 0 } };
  }
  const r = stationaryIterative(M, { tolerance: ITERATIVE_TOLERANCE, maxIterations: ITERATIVE_MAX_ITERATIONS, initial });
  return { mu: r.mu, solver: { method: r.converged ? "symmetric Gauss–Seidel" : "symmetric Gauss–Seidel (not converged)", residual: r.residual, iterations: r.iterations } };
}

function maxOutDegree(M: DenseMatrix | SparseMatrix): number {
  let d = 0;
  if ("data" in M) {
    for (let i = 0; i < M.n; i++) {
      let c = 0;
      for (let j = 0; j < M.n; j++) if (M.data[i * M.n + j] > 0) c++;
      d = Math.max(d, c);
    }
  } else for (let i = 0; i < M.n; i++) d = Math.max(d, M.rowPtr[i + 1] - M.rowPtr[i]);
  return d;
}

/**
 * Min-entropy rate of an irreducible class: Karp up to KARP_LIMIT states, Howard above (its run
 * taken from `prepared`, shared with the class's Rényi rates, when given).
 */
export function classMinEntropy(M: DenseMatrix | SparseMatrix, prepared?: () => RenyiPreparation): { rate: Rate; method: string } {
  if (M.n <= KARP_LIMIT) return { rate: minEntropyRateKarp(M), method: "Karp" };
  const prep = prepared ? prepared() : prepareRenyi(M);
  return { rate: minEntropyRateFromHoward(prep.graph, prep.howard ?? howardMaxMeanCycle(prep.graph)).rate, method: "Howard policy iteration" };
}

/**
 * Rényi rates of a class. An order whose Perron-root iteration fails is left out with a note (the
 * other figures stay valid); it is never replaced by a guess.
 */
function classRenyi(
  M: DenseMatrix | SparseMatrix,
  orders: readonly number[],
  notes: string[],
  prepared: () => RenyiPreparation,
  closedForm?: (order: number) => Rate | null,
): RenyiFigure[] {
  const out: RenyiFigure[] = [];
  for (const order of orders) {
    try {
      const r = M.n === 1 ? { bits: 0, nats: 0 } : (closedForm?.(order) ?? renyiEntropyRate(prepared(), order, { workBudget: RENYI_WORK_BUDGET }));
      out.push({ order, bits: r.bits, nats: r.nats });
    } catch (e) {
      if (!(e instanceof EngineNumericError)) throw e;
      notes.push(`the Rényi rate of order ${order} is not given: ${e.message}`);
    }
  }
  return out;
}

/** A class's figures in closed form (two-state, graph walk). */
interface ClosedFormFigures {
  mu: ArrayLike<number>;
  rate: Rate;
  method: string;
  /** The min-entropy rate in closed form, when there is one (graph walks); Karp / Howard otherwise. */
  minEntropy?: { rate: Rate; method: string };
  /**
   * A scaling bias for the general Rényi route (prepareRenyiScaled) that makes a Howard run
   * unnecessary: −½ ln μ for a reversible chain.
   */
  renyiBias?: ArrayLike<number>;
}

interface ChainOptions {
  orders: number[];
  /** A closed form for a class's μ and rate (two-state, graph walk); the general route otherwise. */
  closedForm?: (states: number[]) => ClosedFormFigures | null;
  /**
   * A special route for a class's Rényi rates (two-state closed form, graph walks' symmetric
   * route): called once per class, it returns the per-order route (null: use the general one).
   */
  renyiClosedForm?: (M: DenseMatrix | SparseMatrix) => (order: number) => Rate | null;
}

function classSummaries(c: Classification): ClassSummary[] {
  return c.classes.map((states, k) => ({ states: [...states], closed: c.closed[k], period: c.periods[k] }));
}

/** Figures of every closed class of a chain. */
function closedClassFigures(chain: PreparedChain, labels: string[], c: Classification, opts: ChainOptions, notes: string[]): ClosedClassFigures[] {
  return c.closedClasses.map((k) => {
    const states = c.classes[k];
    const M = classMatrix(chain, states);
    const closed = opts.closedForm?.(states) ?? null;
    let mu: ArrayLike<number>;
    let solver: SolverInfo;
    let r: Rate;
    if (closed) {
      mu = closed.mu;
      r = closed.rate;
      solver = { method: closed.method, residual: stationaryResidual(M, mu), iterations: 0 };
    } else {
      const s = solveStationary(M);
      mu = s.mu;
      solver = s.solver;
      r = entropyRateGeneral(M, mu);
    }
    // Howard's run (and the log-weight graph) is shared by min-entropy and every Rényi order.
    let prep: RenyiPreparation | null = null;
    const bias = closed?.renyiBias;
    const prepared = () => (prep ??= bias ? prepareRenyiScaled(M, bias) : prepareRenyi(M));
    const min = closed?.minEntropy ?? classMinEntropy(M, prepared);
    return {
      class: k,
      states: [...states],
      labels: states.map((s) => labels[s]),
      stationary: toNumbers(mu),
      period: c.periods[k],
      entropyRate: r,
      minEntropyRate: min.rate,
      minEntropyMethod: min.method,
      renyi: classRenyi(M, opts.orders, notes, prepared, opts.renyiClosedForm?.(M)),
      solver,
    };
  });
}

const SEVERAL_CLASSES_MESSAGE = (k: number) =>
  `the chain has ${k} closed classes, so its entropy rate depends on the initial distribution; each closed class's figures are given in closedClasses`;

interface ChainFigures {
  classes: ClassSummary[];
  closedClasses: ClosedClassFigures[];
  irreducible: boolean;
  stationary: number[] | null;
  period: number | null;
  entropyRate: Rate | null;
  minEntropyRate: Rate | null;
  renyi: RenyiFigure[];
  solver: SolverInfo;
  message?: string;
  notes: string[];
}

function chainFigures(chain: PreparedChain, labels: string[], opts: ChainOptions): ChainFigures {
  const c = classify(chain.sparse);
  const notes: string[] = [];
  const closedClasses = closedClassFigures(chain, labels, c, opts, notes);
  const classes = classSummaries(c);
  if (closedClasses.length === 1) {
    const only = closedClasses[0];
    const mu = new Array<number>(chain.n).fill(0);
    only.states.forEach((s, t) => (mu[s] = only.stationary[t]));
    if (!c.irreducible) {
      notes.push(
        `the chain is reducible with one closed class (${only.states.length} of ${chain.n} states); transient states have stationary probability 0 and the figures are that class's`,
      );
    }
    return {
      classes,
      closedClasses,
      irreducible: c.irreducible,
      stationary: mu,
      period: only.period,
      entropyRate: only.entropyRate,
      minEntropyRate: only.minEntropyRate,
      renyi: only.renyi,
      solver: only.solver,
      notes,
    };
  }
  return {
    classes,
    closedClasses,
    irreducible: false,
    stationary: null,
    period: null,
    entropyRate: null,
    minEntropyRate: null,
    renyi: [],
    solver: { method: "per closed class", residual: Math.max(...closedClasses.map((k) => k.solver.residual)), iterations: 0 },
    message: SEVERAL_CLASSES_MESSAGE(closedClasses.length),
    notes,
  };
}

function base(family: Family, states: string[], symbols: string[]) {
  return { engineVersion: ENGINE_VERSION, family, states, symbols };
}

function computeIid(m: Extract<ModelParams, { family: "iid" }>, req: ValidComputeRequest): UnverifiedResult {
  const labels = m.alphabet.map(labelText);
  const p = m.p;
  const orders = renyiOrdersFor(req.renyiOrders);
  const H = entropyRateIid(p);
  let pmax = 0;
  for (const x of p) pmax = Math.max(pmax, x);
  const minRate = rate(-Math.log2(pmax));
  // (1/(1−α)) log₂ Σ pᵢ^α, with pmax factored out so large α does not underflow.
  const renyi = orders.map((order) => {
    const terms = p.filter((x) => x > 0).map((x) => (x / pmax) ** order);
    const bits = (order * Math.log2(pmax) + Math.log2(compensatedSum(terms))) / (1 - order);
    return { order, bits, nats: bits * LN2 };
  });
  const support = p.flatMap((x, i) => (x > 0 ? [i] : []));
  const classes: ClassSummary[] = [{ states: support, closed: true, period: 1 }];
  p.forEach((x, i) => x === 0 && classes.push({ states: [i], closed: false, period: 0 }));
  classes.sort((x, y) => x.states[0] - y.states[0]);
  const notes: string[] = [];
  if (support.length < p.length) notes.push(`${p.length - support.length} symbol(s) have probability 0`);
  const solver = { method: "closed form (i.i.d.)", residual: 0, iterations: 0 };
  return {
    ...base("iid", labels, labels),
    stationary: toNumbers(p),
    symbolDistribution: toNumbers(p),
    irreducible: support.length === p.length,
    period: 1,
    classes,
    closedClasses: [
      {
        class: classes.findIndex((k) => k.closed),
        states: support,
        labels: support.map((i) => labels[i]),
        stationary: support.map((i) => p[i]),
        period: 1,
        entropyRate: H,
        minEntropyRate: minRate,
        minEntropyMethod: "closed form −log₂ max pᵢ",
        renyi,
        solver,
      },
    ],
    entropyRate: H,
    minEntropyRate: minRate,
    renyi,
    blockEntropies: blockEntropies({ alphabetSize: p.length, order: 0, contextStationary: [1], rateBits: H.bits, maxLength: req.blockLengths ?? DEFAULT_BLOCK_LENGTHS }),
    solver,
    notes,
  };
}

function chainResult(
  family: Family,
  chain: PreparedChain,
  labels: string[],
  symbols: string[],
  order: number,
  req: ValidComputeRequest,
  closedForm?: ChainOptions["closedForm"],
  renyiClosedForm?: ChainOptions["renyiClosedForm"],
): UnverifiedResult {
  const f = chainFigures(chain, labels, { orders: renyiOrdersFor(req.renyiOrders), closedForm, renyiClosedForm });
  const maxLength = req.blockLengths ?? DEFAULT_BLOCK_LENGTHS;
  const notes = [...f.notes];
  let blocks: BlockEntropy[] = [];
  if (f.stationary && f.entropyRate) {
    blocks = blockEntropies({ alphabetSize: symbols.length, order, contextStationary: f.stationary, rateBits: f.entropyRate.bits, maxLength });
  } else notes.push("block entropies need a unique stationary distribution; none are given for a chain with several closed classes");
  if (f.period !== null && f.period > 1) notes.push(`the chain is periodic (period ${f.period}); the stationary distribution is the long-run average`);
  const symbolDistribution = f.stationary ? (order === 1 ? f.stationary : symbolMarginal(f.stationary, symbols.length)) : null;
  const { notes: _n, ...rest } = f;
  return { ...base(family, labels, symbols), ...rest, symbolDistribution, blockEntropies: blocks, notes };
}

/** The first-order chain of a Markov, two-state or graph-walk model, with state and symbol labels. O(size). */
export function prepareChain(m: ModelParams): { chain: PreparedChain; labels: string[]; symbols: string[]; order: number; edges?: WeightedEdges } {
  switch (m.family) {
    case "markov": {
      const symbols = m.alphabet.map(labelText);
      const order = m.order ?? 1;
      const n = symbols.length;
      let chain: PreparedChain;
      if (m.transitions) {
        const T = m.transitions.filter((t) => t[2] > 0);
        const rows = Int32Array.from(T, (t) => t[0]);
        const cols = Int32Array.from(T, (t) => t[1]);
        const vals = Float64Array.from(T, (t) => t[2]);
        chain = { n, sparse: sparseFromTriples(n, rows, cols, vals), dense: null };
      } else if (order === 1) {
        const dense = denseFromRows(m.P!);
        chain = { n, sparse: denseToSparse(dense), dense };
      } else {
        const sparse = liftOrderK(m.P!, n, order);
        chain = { n: sparse.n, sparse, dense: null };
      }
      return { chain, labels: order === 1 ? symbols : contextLabels(symbols, order), symbols, order };
    }
    case "two-state": {
      const symbols = m.alphabet.map(labelText);
      const dense: DenseMatrix = { n: 2, data: new Float64Array([1 - m.a, m.a, m.b, 1 - m.b]) };
      return { chain: { n: 2, sparse: denseToSparse(dense), dense }, labels: symbols, symbols, order: 1 };
    }
    case "graph-walk": {
      const labels = m.nodes.map(labelText);
      const edges = graphEdges(m);
      return { chain: { n: labels.length, sparse: graphWalkMatrix(labels.length, edges), dense: null }, labels, symbols: labels, order: 1, edges };
    }
    default:
      throw new EngineInputError(`prepareChain: the ${m.family} family is not a chain model`, [{ path: "model.family", message: "not a chain model" }]);
  }
}

/** What prepareChain returns. */
type Prepared = ReturnType<typeof prepareChain>;

function computeMarkov(m: Extract<ModelParams, { family: "markov" }>, req: ValidComputeRequest, prep: Prepared): UnverifiedResult {
  const { chain, labels, symbols, order } = prep;
  const r = chainResult("markov", chain, labels, symbols, order, req);
  if (order > 1) r.notes.push(`order-${order} chain lifted to a first-order chain on its ${labels.length} contexts`);
  return r;
}

/**
 * Rényi rate of an irreducible 2 × 2 chain in closed form: the Perron root of [Pᵢⱼ^α] is
 * (p + s + √((p − s)² + 4qr))/2 (no cancellation under the root), with entries scaled by the
 * largest so that large α does not underflow. O(1). Returns null for other sizes.
 */
export function twoStateRenyi(M: DenseMatrix | SparseMatrix, order: number): Rate | null {
  if (M.n !== 2 || !("data" in M)) return null;
  const logs = Array.from(M.data, (x) => (x > 0 ? order * Math.log(x) : -Infinity));
  const top = Math.max(...logs);
  const [p, q, r, s] = logs.map((l) => Math.exp(l - top));
  const root = (p + s + Math.sqrt((p - s) ** 2 + 4 * q * r)) / 2;
  const nats = (top + Math.log(root)) / (1 - order);
  return { bits: nats / LN2, nats };
}

function computeTwoState(m: Extract<ModelParams, { family: "two-state" }>, req: ValidComputeRequest, prep: Prepared): UnverifiedResult {
  const { chain, symbols } = prep;
  const { a, b } = m;
  // μ = (b, a)/(a + b) and (b·h(a) + a·h(b))/(a + b) apply whenever a + b > 0 (one closed class).
  const closedForm = (states: number[]) => {
    if (a + b === 0) return null;
    const cf = entropyRateTwoState(a, b);
    const mu = states.map((s) => cf.stationary[s]);
    return { mu, rate: cf.rate, method: "closed form (two-state)" };
  };
  return chainResult("two-state", chain, symbols, symbols, 1, req, closedForm, (M) => (order) => twoStateRenyi(M, order));
}

/** Graph edges as index arrays (labels resolved), zero weights dropped. O(edges). */
export function graphEdges(m: Extract<ModelParams, { family: "graph-walk" }>): WeightedEdges {
  const map = new Map<string, number>();
  m.nodes.forEach((l, i) => map.set(labelText(l), i));
  const index = labelResolver(m.nodes, map);
  let kept = 0;
  for (const e of m.edges) if (e[2] > 0) kept++;
  const out: WeightedEdges = { u: new Int32Array(kept), v: new Int32Array(kept), w: new Float64Array(kept) };
  let q = 0;
  for (const e of m.edges) {
    if (!(e[2] > 0)) continue;
    out.u[q] = index(e[0])!;
    out.v[q] = index(e[1])!;
    out.w[q] = e[2];
    q++;
  }
  return out;
}

/**
 * Rényi rate of a graph walk's class through its symmetric form (the walk is reversible), with half
 * of RENYI_WORK_BUDGET; null (so the general power-iteration route runs with its own budget) when
 * the symmetric bracket does not narrow in time. O(budget).
 */
export function graphWalkRenyi(M: DenseMatrix | SparseMatrix, order: number): Rate | null {
  return graphWalkRenyiRoute(M)(order);
}

/**
 * graphWalkRenyi for several orders of one class: the symmetric form is prepared once, on the first
 * order that needs it; a preparation that fails (the graph is not symmetric) sends every order to
 * the general route. O(n + nnz) once, then O(budget) per order.
 */
export function graphWalkRenyiRoute(M: DenseMatrix | SparseMatrix): (order: number) => Rate | null {
  const budget = RENYI_WORK_BUDGET / 2;
  // undefined: not built yet; null: the route cannot help (budget below one restart, or not symmetric).
  let prep: ReversibleRenyiPreparation | null | undefined;
  return (order) => {
    try {
      if (prep === undefined) {
        prep = null;
        if (reversibleRenyiFitsBudget(M, budget)) prep = prepareReversibleRenyi(M);
      }
      if (prep === null) return null;
      const r = reversibleRenyiEntropyRate(prep, order, { workBudget: budget });
      return { bits: r.bits, nats: r.nats };
    } catch (e) {
      if (e instanceof EngineNumericError) return null;
      throw e;
    }
  };
}

function computeGraphWalk(req: ValidComputeRequest, prep: Prepared): UnverifiedResult {
  const { chain, labels } = prep;
  const n = labels.length;
  const edges = prep.edges!;
  // Each connected component is a closed class; the closed form applies to its own edges.
  const closedForm = (states: number[]) => {
    let sub: WeightedEdges = edges;
    if (states.length < n) {
      const pos = new Int32Array(n).fill(-1);
      states.forEach((s, k) => (pos[s] = k));
      let count = 0;
      for (let e = 0; e < edges.u.length; e++) if (pos[edges.u[e]] >= 0) count++;
      sub = { u: new Int32Array(count), v: new Int32Array(count), w: new Float64Array(count) };
      let q = 0;
      for (let e = 0; e < edges.u.length; e++) {
        if (pos[edges.u[e]] < 0) continue;
        sub.u[q] = pos[edges.u[e]];
        sub.v[q] = pos[edges.v[e]];
        sub.w[q] = edges.w[e];
        q++;
      }
    }
    const cf = graphWalkClosedForm(states.length, sub);
    const M = states.length < n ? restrictSparse(chain.sparse, states) : chain.sparse;
    return {
      mu: cf.stationary,
      rate: cf.rate,
      method: "closed form (graph walk, μᵢ = Wᵢ/2W)",
      minEntropy: { rate: reversibleMinEntropyRate(M, cf.stationary), method: "closed form (graph walk, −max log₂ wᵢⱼ/√(WᵢWⱼ))" },
      // Reversible: x = −½ ln μ turns [Pᵢⱼ^α] into its symmetric form, so no Howard run is needed.
      renyiBias: Float64Array.from(cf.stationary, (m) => -0.5 * Math.log(m)),
    };
  };
  const r = chainResult("graph-walk", chain, labels, labels, 1, req, closedForm, graphWalkRenyiRoute);
  if (r.closedClasses.length > 1) {
    r.message = `the graph has ${r.closedClasses.length} connected components, so the walk's entropy rate depends on where it starts; each component's figures are given in closedClasses`;
  }
  return r;
}

function computeHidden(m: Extract<ModelParams, { family: "hidden" }>, req: ValidComputeRequest): UnverifiedResult {
  const labels = m.states.map(labelText);
  const symbols = m.alphabet.map(labelText);
  const s = labels.length;
  const k = symbols.length;
  const P = denseFromRows(m.P);
  const Bdata = new Float64Array(s * k);
  m.B.forEach((row, i) => Bdata.set(row, i * k));
  const B: EmissionMatrix = { states: s, symbols: k, data: Bdata };
  const chain = { n: s, sparse: denseToSparse(P), dense: P };
  const c = classify(chain.sparse);
  const maxN = req.blockLengths ?? DEFAULT_BLOCK_LENGTHS;
  const notes: string[] = [];
  const closedClasses: ClosedClassFigures[] = c.closedClasses.map((ci) => {
    const states = c.classes[ci];
    const Pc = restrictDense(P, states);
    const Bc: EmissionMatrix = { states: states.length, symbols: k, data: new Float64Array(states.length * k) };
    states.forEach((st, t) => Bc.data.set(Bdata.subarray(st * k, st * k + k), t * k));
    const sol = solveStationary(Pc);
    const hb = hiddenSourceBounds(Pc, Bc, sol.mu, { maxN });
    const last = hb.bounds[hb.bounds.length - 1];
    return {
      class: ci,
      states: [...states],
      labels: states.map((t) => labels[t]),
      stationary: toNumbers(sol.mu),
      period: c.periods[ci],
      entropyRate: rate((last.lower + last.upper) / 2),
      minEntropyRate: null,
      minEntropyMethod: null,
      renyi: [],
      solver: sol.solver,
      bounds: hb.bounds.map((x) => ({ n: x.n, lower: x.lower, upper: x.upper })),
    };
  });
  const classes = classSummaries(c);
  const common = {
    ...base("hidden", labels, symbols),
    irreducible: c.irreducible,
    classes,
    closedClasses,
    minEntropyRate: null,
    renyi: [] as RenyiFigure[],
  };
  notes.push("min-entropy and Rényi rates are not computed for hidden sources (no finite formula); only the Shannon rate is bracketed");
  if (closedClasses.length > 1) {
    return {
      ...common,
      stationary: null,
      symbolDistribution: null,
      period: null,
      entropyRate: null,
      blockEntropies: [],
      solver: { method: "per closed class", residual: Math.max(...closedClasses.map((x) => x.solver.residual)), iterations: 0 },
      message: SEVERAL_CLASSES_MESSAGE(closedClasses.length).replace("the chain", "the hidden chain"),
      notes,
    };
  }
  const only = closedClasses[0];
  const mu = new Float64Array(s);
  only.states.forEach((st, t) => (mu[st] = only.stationary[t]));
  if (!c.irreducible) notes.push("the hidden chain is reducible with one closed class; transient states have stationary probability 0");
  const hb = hiddenSourceBounds(P, B, mu, { maxN });
  const last = hb.bounds[hb.bounds.length - 1];
  if (hb.n < maxN) notes.push(`bounds stop at n = ${hb.n} of ${maxN} requested: the exact enumeration's work budget (${hb.budget}) is spent`);
  const length = Math.max(200, Math.min(5000, Math.floor(4e7 / (MONTE_CARLO_RUNS * s * s))));
  const mc = hiddenMonteCarlo(P, B, mu, { length, runs: MONTE_CARLO_RUNS, seed: req.seed ?? DEFAULT_SEED });
  const symbolDistribution = new Array<number>(k).fill(0);
  for (let i = 0; i < s; i++) for (let y = 0; y < k; y++) symbolDistribution[y] += mu[i] * Bdata[i * k + y];
  const blocks: BlockEntropy[] = hb.bounds.map((x, t) => {
    const joint = hb.blockEntropyBits[t];
    return { n: x.n, joint, perSymbol: joint / x.n, conditional: x.upper };
  });
  notes.push(
    `entropy rate: midpoint of the sandwich bounds at n = ${last.n}, [${last.lower}, ${last.upper}] bits/symbol (half-width ${(last.upper - last.lower) / 2})`,
  );
  return {
    ...common,
    stationary: toNumbers(mu),
    symbolDistribution,
    period: only.period,
    entropyRate: only.entropyRate.bits === (last.lower + last.upper) / 2 ? only.entropyRate : rate((last.lower + last.upper) / 2),
    blockEntropies: blocks,
    bounds: hb.bounds.map((x) => ({ n: x.n, lower: x.lower, upper: x.upper })),
    monteCarlo: { ...mc, ci95: [mc.ci95[0], mc.ci95[1]] },
    solver: only.solver,
    notes,
  };
}

/**
 * Checks every number is finite (never a silent NaN) and turns −0 into 0, in place, so the result
 * survives a JSON round trip unchanged. O(size of the result).
 */
function checkFinite(value: unknown, path: string): void {
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const v = value[i];
      if (typeof v === "number") value[i] = finite(v, `${path}[${i}]`);
      else checkFinite(v, `${path}[${i}]`);
    }
  } else if (value && typeof value === "object") {
    const o = value as Record<string, unknown>;
    for (const k of Object.keys(o)) {
      const v = o[k];
      const p = path ? `${path}.${k}` : k;
      if (typeof v === "number") o[k] = finite(v, p);
      else checkFinite(v, p);
    }
  }
}

function finite(v: number, path: string): number {
  if (!Number.isFinite(v)) throw new EngineInputError(`the engine produced a non-finite figure at ${path}`, [{ path, message: "non-finite figure" }]);
  return v === 0 ? 0 : v;
}

/**
 * All figures of a validated request, without the verification record. Cost: dominated by the
 * stationary solve (O(n³/3) GTH up to GTH_LIMIT states per class, O(nnz) per Gauss–Seidel sweep
 * above), Karp (O(n·nnz) up to KARP_LIMIT) and, for hidden sources, the bounded exact enumeration
 * plus Monte Carlo. Throws EngineNumericError / HiddenSourceError from the numerical modules, and
 * EngineInputError if a figure came out non-finite (never returned silently).
 */
export function computeUnverified(req: ValidComputeRequest): UnverifiedResult {
  return computeWithChain(req).result;
}

/** computeUnverified, also handing back the prepared chain (chain families) for the verification to reuse. */
function computeWithChain(req: ValidComputeRequest): { result: UnverifiedResult; chain: PreparedChain | null } {
  const m = req.model;
  let r: UnverifiedResult;
  let chain: PreparedChain | null = null;
  switch (m.family) {
    case "iid":
      r = computeIid(m, req);
      break;
    case "markov": {
      const prep = prepareChain(m);
      chain = prep.chain;
      r = computeMarkov(m, req, prep);
      break;
    }
    case "two-state": {
      const prep = prepareChain(m);
      chain = prep.chain;
      r = computeTwoState(m, req, prep);
      break;
    }
    case "graph-walk": {
      const prep = prepareChain(m);
      chain = prep.chain;
      r = computeGraphWalk(req, prep);
      break;
    }
    case "hidden":
      r = computeHidden(m, req);
      break;
  }
  checkFinite(r, "");
  return { result: r, chain };
}

const KEY_ORDER = [
  "engineVersion", "family", "entropyRate", "minEntropyRate", "renyi", "stationary", "states", "symbols",
  "symbolDistribution", "irreducible", "period", "message", "classes", "closedClasses", "bounds", "monteCarlo",
  "blockEntropies", "solver", "notes", "verification",
] as const;

/** The same result with its keys in reading order (figures first); JSON consumers see a stable layout. */
function ordered(r: ComputeResult): ComputeResult {
  const out: Record<string, unknown> = {};
  for (const k of KEY_ORDER) if (r[k] !== undefined) out[k] = r[k];
  return out as unknown as ComputeResult;
}

/** Parses a request (or passes a validated one through); throws EngineInputError with `{ message, issues }`. */
export function requireValidRequest(request: unknown): { value: ValidComputeRequest; notes: string[] } {
  const parsed = parseComputeRequest(request);
  if (!parsed.ok) throw new EngineInputError(parsed.error.message, parsed.error.issues);
  return { value: parsed.value, notes: parsed.notes };
}

/**
 * The compute API: validates `{ model, renyiOrders?, blockLengths?, normalize?, seed? }`, computes
 * every figure and attaches the verification record (a failed check sets `verification.passed`
 * false; publishing code calls assertVerified). Cost as computeUnverified, about twice over with
 * the verification. Throws EngineInputError for invalid input, and also, with the numerical
 * module's message, when a solver rejects the model (so bad input never surfaces as a crash).
 */
export function computeFigures(request: unknown): ComputeResult {
  const { value, notes } = requireValidRequest(request);
  try {
    const { result: r, chain } = computeWithChain(value);
    r.notes = [...notes, ...r.notes];
    // The request is already validated and the chain built: the verification reuses both.
    const verification = verifyValidated(value, r, chain);
    checkFinite(verification, "verification");
    return ordered({ ...r, verification });
  } catch (e) {
    if (e instanceof EngineInputError) throw e;
    const message = e instanceof Error ? e.message : String(e);
    throw new EngineInputError(`the engine could not compute this model: ${message}`, [{ path: "model", message }]);
  }
}
