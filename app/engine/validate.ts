/**
 * Validation of model parameters and compute requests: the schemas' shape check (schema.ts), then the
 * probability rules, each with a message in the user's words and a path such as `model.P[2][1]`.
 * All issues are collected (up to LIMITS.issues), not just the first.
 */
import type { z } from "zod";
import { ROW_SUM_TOLERANCE, compensatedSum } from "./numeric";
import type { InputErrorBody, InputIssue } from "./errors";
import {
  FAMILIES,
  LIMITS,
  computeRequestSchema,
  describeValue,
  formatCount,
  modelParamsSchema,
  type ComputeRequest,
  type GraphWalkParams,
  type HiddenParams,
  type IidParams,
  type Label,
  type MarkovParams,
  type ModelParams,
  type TwoStateParams,
} from "./schema";

/** The outcome of a parse: the validated (possibly normalised) value and notes, or the error body. */
export type ParseResult<T> = { ok: true; value: T; notes: string[] } | { ok: false; error: InputErrorBody };

/** Options of parseModel. */
export interface ParseModelOptions {
  /** Rescale rows (and p, B rows) that are off by more than ROW_SUM_TOLERANCE; zero rows still fail. */
  normalize?: boolean;
}

/** A validated compute request; `model.order` is always set for Markov chains. */
export type ValidComputeRequest = Omit<ComputeRequest, "model"> & { model: ModelParams };

/** Label text used in messages and state names (numbers compare as their decimal text). */
export function labelText(l: Label): string {
  return typeof l === "number" ? String(l) : l;
}

/**
 * Resolves a label to its index in `labels`, given `index` (label text → first index): a number
 * equal to its own position (nodes 0, 1, 2, … as numbers, the usual form of a large graph) is
 * answered without making its text; anything else goes through the map. O(1) per label.
 */
export function labelResolver(labels: readonly Label[], index: ReadonlyMap<string, number>): (l: Label) => number | undefined {
  const n = labels.length;
  return (l) => {
    if (typeof l === "number" && Number.isInteger(l) && l >= 0 && l < n && labels[l] === l) return l | 0;
    return index.get(labelText(l));
  };
}

/** A number as a person would write it: 12 significant digits, no float noise (0.98, not 0.9800000000000001). */
export function formatNumber(x: number, digits = 12): string {
  if (!Number.isFinite(x)) return String(x);
  return String(Number(x.toPrecision(digits)));
}

/** Formats a zod path: ["P", 2, 1] → "P[2][1]"; a prefix joins with a dot. O(path). */
export function formatPath(path: readonly PropertyKey[], prefix = ""): string {
  let s = prefix;
  for (const k of path) {
    if (typeof k === "number") s += `[${k}]`;
    else s += s === "" ? String(k) : `.${String(k)}`;
  }
  return s;
}

class IssueList {
  readonly items: InputIssue[] = [];
  truncated = false;
  constructor(private readonly prefix: string) {}
  /** Adds an issue at a path relative to the model; false once the cap is reached. */
  add(path: string, message: string): boolean {
    if (this.items.length >= LIMITS.issues) {
      this.truncated = true;
      return false;
    }
    const full = this.prefix === "" ? path : path === "" ? this.prefix : `${this.prefix}.${path}`;
    this.items.push({ path: full, message });
    return true;
  }
  get full(): boolean {
    return this.items.length >= LIMITS.issues;
  }
}

function errorBody(list: IssueList, what: string): InputErrorBody {
  const n = list.items.length;
  const first = list.items[0]?.message ?? "invalid input";
  const message =
    n === 1
      ? first
      : `${list.truncated ? `more than ${n}` : String(n)} problems with the ${what}; the first: ${first}`;
  return { message, issues: list.items };
}

function zodIssues(err: z.ZodError, input: unknown, list: IssueList, prefixPath: PropertyKey[] = []): void {
  for (const iss of err.issues) {
    const rel = iss.path.slice(prefixPath.length);
    const path = formatPath(rel);
    let message = iss.message;
    if (iss.code === "invalid_union" && rel.length === 1 && rel[0] === "family") {
      const fam = (input as { family?: unknown } | null)?.family;
      const known = FAMILIES.map((f) => `"${f}"`).join(", ");
      message = fam === undefined ? `family is missing; expected one of ${known}` : `unknown family ${describeValue(fam)}; expected one of ${known}`;
    } else if (iss.code === "invalid_type" && rel.length === 0) {
      message = `the model must be a JSON object such as { "family": "iid", … }; got ${describeValue(input)}`;
    } else if (iss.code === "invalid_type") {
      message = `${path} has the wrong type: ${iss.message}`;
    } else if (iss.code === "unrecognized_keys") {
      const fam = (input as { family?: unknown } | null)?.family;
      for (const k of iss.keys) {
        if (!list.add(formatPath([...rel, k]), `unexpected field "${k}" for the ${String(fam)} family`)) return;
      }
      continue;
    }
    if (!list.add(path, message)) return;
  }
}

function quoted(l: Label): string {
  return JSON.stringify(labelText(l));
}

function checkLabelsUnique(labels: Label[], name: string, list: IssueList): Map<string, number> {
  const seen = new Map<string, number>();
  for (let i = 0; i < labels.length; i++) {
    const t = labelText(labels[i]);
    const first = seen.get(t);
    if (first !== undefined) {
      if (!list.add(`${name}[${i}]`, `${name} has a duplicate: ${quoted(labels[i])} at ${first} and ${i}`)) break;
    } else seen.set(t, i);
  }
  return seen;
}

/** Checks entries of one probability row; returns false if any entry is negative or above 1. */
function checkProbabilityCells(row: number[], path: string, name: string, list: IssueList): boolean {
  let ok = true;
  for (let j = 0; j < row.length; j++) {
    const v = row[j];
    if (v < 0) {
      ok = false;
      if (!list.add(`${path}[${j}]`, `${name}[${j}] is negative (${formatNumber(v)})`)) return false;
    } else if (v > 1) {
      ok = false;
      if (!list.add(`${path}[${j}]`, `${name}[${j}] is greater than 1 (${formatNumber(v)})`)) return false;
    }
  }
  return ok;
}

/**
 * Checks that a row sums to 1 and, with normalize, rescales it. Returns the row to use (the same
 * array if untouched). `what` names it in messages, e.g. `row 3 ("c")`.
 */
function checkRowSum(
  row: number[],
  sum: number,
  what: string,
  path: string,
  list: IssueList,
  notes: string[],
  normalize: boolean,
): number[] {
  if (Math.abs(sum - 1) <= ROW_SUM_TOLERANCE) return row;
  if (sum === 0) {
    list.add(path, `${what} sums to 0${normalize ? " and cannot be normalised" : ""}; it needs at least one positive entry`);
    return row;
  }
  if (normalize) {
    notes.push(`${what} summed to ${formatNumber(sum)}; rescaled to sum to 1`);
    return row.map((v) => v / sum);
  }
  list.add(path, `${what} sums to ${formatNumber(sum)}, not 1 (off by ${formatNumber(Math.abs(1 - sum), 6)})`);
  return row;
}

function contextLabelOf(index: number, alphabet: Label[], order: number): string {
  const m = alphabet.length;
  const parts: string[] = new Array(order);
  let c = index;
  for (let t = order - 1; t >= 0; t--) {
    parts[t] = labelText(alphabet[c % m]);
    c = Math.floor(c / m);
  }
  return parts.join("·");
}

function validateIid(m: IidParams, list: IssueList, notes: string[], normalize: boolean): IidParams {
  checkLabelsUnique(m.alphabet, "alphabet", list);
  if (m.p.length !== m.alphabet.length) {
    list.add("p", `p has ${m.p.length} entries but the alphabet has ${m.alphabet.length} symbols`);
    return m;
  }
  if (!checkProbabilityCells(m.p, "p", "p", list)) return m;
  const p = checkRowSum(m.p, compensatedSum(m.p), "p", "p", list, notes, normalize);
  return p === m.p ? m : { ...m, p };
}

function validateTwoState(m: TwoStateParams, list: IssueList): TwoStateParams {
  checkLabelsUnique(m.alphabet, "alphabet", list);
  for (const k of ["a", "b"] as const) {
    const v = m[k];
    if (v < 0 || v > 1) list.add(k, `${k} must be a probability in [0, 1]; got ${formatNumber(v)}`);
  }
  return m;
}

function validateDenseRows(
  P: number[][],
  rowLabel: (i: number) => string,
  cols: number,
  colWhat: string,
  name: string,
  list: IssueList,
  notes: string[],
  normalize: boolean,
): number[][] {
  let out: number[][] | null = null;
  for (let i = 0; i < P.length && !list.full; i++) {
    const row = P[i];
    const what = `${name === "P" ? "row" : `${name} row`} ${i} (${rowLabel(i)})`;
    if (row.length !== cols) {
      list.add(`${name}[${i}]`, `${what} has ${row.length} entries but ${colWhat}`);
      continue;
    }
    if (!checkProbabilityCells(row, `${name}[${i}]`, `${name}[${i}]`, list)) continue;
    const fixed = checkRowSum(row, compensatedSum(row), what, `${name}[${i}]`, list, notes, normalize);
    if (fixed !== row) {
      out ??= P.slice();
      out[i] = fixed;
    }
  }
  return out ?? P;
}

function validateMarkov(m: MarkovParams, list: IssueList, notes: string[], normalize: boolean): MarkovParams {
  const order = m.order ?? 1;
  const A = m.alphabet;
  checkLabelsUnique(A, "alphabet", list);
  if (m.P !== undefined && m.transitions !== undefined) {
    list.add("", "give either P or transitions, not both");
    return m;
  }
  if (m.P === undefined && m.transitions === undefined) {
    list.add("P", "P is missing (or give transitions: [[i, j, p], …] for a sparse order-1 chain)");
    return m;
  }
  if (m.transitions !== undefined) return validateSparseMarkov(m, list, notes, normalize);
  const contexts = A.length ** order;
  if (contexts > LIMITS.denseStates) {
    const what =
      order === 1
        ? `a chain given by P over ${formatCount(A.length)} symbols has ${formatCount(contexts)} states; the limit for a dense P is ${formatCount(LIMITS.denseStates)} (give transitions instead)`
        : `an order-${order} chain over ${formatCount(A.length)} symbols has ${formatCount(contexts)} contexts (states); the limit is ${formatCount(LIMITS.denseStates)}`;
    list.add(order === 1 ? "P" : "order", what);
    return m;
  }
  const P = m.P!;
  if (P.length !== contexts) {
    list.add(
      "P",
      `an order-${order} chain over ${A.length} symbols needs ${contexts} rows (one per context, in lexicographic order); got ${P.length}`,
    );
    return m;
  }
  const fixed = validateDenseRows(
    P,
    (i) => JSON.stringify(order === 1 ? labelText(A[i]) : contextLabelOf(i, A, order)),
    A.length,
    `the alphabet has ${A.length} symbols`,
    "P",
    list,
    notes,
    normalize,
  );
  return { ...m, order, P: fixed };
}

function validateSparseMarkov(m: MarkovParams, list: IssueList, notes: string[], normalize: boolean): MarkovParams {
  const order = m.order ?? 1;
  if (order !== 1) {
    list.add("transitions", `transitions are for order-1 chains; this chain has order ${order} (give P instead)`);
    return m;
  }
  const T = m.transitions!;
  const n = m.alphabet.length;
  let bad = false;
  // Counting sort by row, then sort each row's columns: finds repeats in O(m log d) and gives row sums.
  const rowCount = new Int32Array(n + 1);
  for (let t = 0; t < T.length; t++) {
    const [i, j, p] = T[t];
    if (i >= n || j >= n) {
      bad = true;
      if (!list.add(`transitions[${t}]`, `transition ${t} names state ${i >= n ? i : j}, but the alphabet has ${n} symbols (indices 0 to ${n - 1})`)) return m;
      continue;
    }
    if (p < 0) {
      bad = true;
      if (!list.add(`transitions[${t}]`, `transition ${t} (P[${i}][${j}]) is negative (${formatNumber(p)})`)) return m;
    } else if (p > 1) {
      bad = true;
      if (!list.add(`transitions[${t}]`, `transition ${t} (P[${i}][${j}]) is greater than 1 (${formatNumber(p)})`)) return m;
    }
    rowCount[i + 1]++;
  }
  if (bad) return m;
  for (let i = 0; i < n; i++) rowCount[i + 1] += rowCount[i];
  const fill = rowCount.slice(0, n);
  const byRow = new Int32Array(T.length);
  for (let t = 0; t < T.length; t++) byRow[fill[T[t][0]]++] = t;
  let scale: Map<number, number> | null = null;
  for (let i = 0; i < n && !list.full; i++) {
    const start = rowCount[i];
    const end = rowCount[i + 1];
    const label = quoted(m.alphabet[i]);
    if (start === end) {
      list.add("transitions", `row ${i} (${label}) has no transitions (sums to 0); every state needs at least one`);
      continue;
    }
    const ts = Array.from(byRow.subarray(start, end)).sort((x, y) => T[x][1] - T[y][1] || x - y);
    const vals = new Float64Array(ts.length);
    for (let k = 0; k < ts.length; k++) {
      vals[k] = T[ts[k]][2];
      if (k > 0 && T[ts[k]][1] === T[ts[k - 1]][1]) {
        list.add(`transitions[${ts[k]}]`, `transition ${ts[k]} repeats P[${i}][${T[ts[k]][1]}] (first given by transition ${ts[k - 1]})`);
      }
    }
    const sum = compensatedSum(vals);
    const what = `row ${i} (${label})`;
    if (Math.abs(sum - 1) <= ROW_SUM_TOLERANCE) continue;
    if (sum === 0) list.add("transitions", `${what} sums to 0${normalize ? " and cannot be normalised" : ""}; it needs at least one positive entry`);
    else if (normalize) {
      notes.push(`${what} summed to ${formatNumber(sum)}; rescaled to sum to 1`);
      (scale ??= new Map()).set(i, sum);
    } else list.add("transitions", `${what} sums to ${formatNumber(sum)}, not 1 (off by ${formatNumber(Math.abs(1 - sum), 6)})`);
  }
  if (scale === null) return { ...m, order };
  const s = scale;
  return { ...m, order, transitions: T.map(([i, j, p]) => (s.has(i) ? [i, j, p / s.get(i)!] : [i, j, p]) as [number, number, number]) };
}

function validateGraph(m: GraphWalkParams, list: IssueList): GraphWalkParams {
  const index = labelResolver(m.nodes, checkLabelsUnique(m.nodes, "nodes", list));
  const weight = new Float64Array(m.nodes.length);
  let bad = false;
  for (let e = 0; e < m.edges.length; e++) {
    const edge = m.edges[e];
    const u = edge[0];
    const v = edge[1];
    const w = edge[2];
    const iu = index(u);
    const iv = index(v);
    if (iu === undefined || iv === undefined) {
      bad = true;
      if (!list.add(`edges[${e}]`, `edge ${e} names an unknown node ${quoted(iu === undefined ? u : v)}`)) return m;
      continue;
    }
    if (w < 0) {
      bad = true;
      if (!list.add(`edges[${e}]`, `edge ${e} has a negative weight (${formatNumber(w)})`)) return m;
      continue;
    }
    weight[iu] += w;
    weight[iv] += w;
  }
  if (bad) return m;
  for (let i = 0; i < m.nodes.length; i++) {
    if (weight[i] === 0 && !list.add(`nodes[${i}]`, `node ${quoted(m.nodes[i])} has no edges (weight 0)`)) break;
  }
  return m;
}

function validateHidden(m: HiddenParams, list: IssueList, notes: string[], normalize: boolean): HiddenParams {
  checkLabelsUnique(m.states, "states", list);
  checkLabelsUnique(m.alphabet, "alphabet", list);
  const n = m.states.length;
  let P = m.P;
  let B = m.B;
  if (m.P.length !== n) list.add("P", `P has ${m.P.length} rows but there are ${n} states`);
  else P = validateDenseRows(m.P, (i) => quoted(m.states[i]), n, `there are ${n} states`, "P", list, notes, normalize);
  if (m.B.length !== n) list.add("B", `B has ${m.B.length} rows but there are ${n} states`);
  else
    B = validateDenseRows(m.B, (i) => quoted(m.states[i]), m.alphabet.length, `the alphabet has ${m.alphabet.length} symbols`, "B", list, notes, normalize);
  return P === m.P && B === m.B ? m : { ...m, P, B };
}

function validateSemantics(m: ModelParams, list: IssueList, notes: string[], normalize: boolean): ModelParams {
  switch (m.family) {
    case "iid":
      return validateIid(m, list, notes, normalize);
    case "two-state":
      return validateTwoState(m, list);
    case "markov":
      return validateMarkov(m, list, notes, normalize);
    case "graph-walk":
      return validateGraph(m, list);
    case "hidden":
      return validateHidden(m, list, notes, normalize);
  }
}

function parseModelInto(input: unknown, list: IssueList, notes: string[], normalize: boolean): ModelParams | null {
  const shape = modelParamsSchema.safeParse(input);
  if (!shape.success) {
    zodIssues(shape.error, input, list);
    return null;
  }
  const value = validateSemantics(shape.data, list, notes, normalize);
  return list.items.length === 0 ? value : null;
}

/**
 * Validates one model's parameters (bare, as in a catalog file). O(size of the input), plus
 * O(m log d) for sparse transitions. Never throws: problems come back as `{ ok: false, error }`.
 */
export function parseModel(input: unknown, opts: ParseModelOptions = {}): ParseResult<ModelParams> {
  const list = new IssueList("");
  const notes: string[] = [];
  const value = parseModelInto(input, list, notes, opts.normalize === true);
  if (value === null) return { ok: false, error: errorBody(list, "model") };
  return { ok: true, value, notes };
}

/**
 * Validates a compute request `{ model, renyiOrders?, blockLengths?, normalize?, seed? }`; model paths
 * are prefixed `model.`. O(size of the input). Never throws.
 */
export function parseComputeRequest(body: unknown): ParseResult<ValidComputeRequest> {
  const list = new IssueList("");
  const notes: string[] = [];
  if (typeof body !== "object" || body === null || Array.isArray(body)) {
    list.add("", `the request must be a JSON object { "model": … }; got ${describeValue(body)}`);
    return { ok: false, error: errorBody(list, "request") };
  }
  const shape = computeRequestSchema.safeParse(body);
  const raw = body as { model?: unknown };
  if (!shape.success) {
    // Model shape problems are reported with the model's own rules, so split them off.
    const modelList = new IssueList("model");
    const other: z.core.$ZodIssue[] = [];
    const modelIssues: z.core.$ZodIssue[] = [];
    for (const iss of shape.error.issues) (iss.path[0] === "model" && iss.path.length > 0 && raw.model !== undefined ? modelIssues : other).push(iss);
    if (modelIssues.length > 0) zodIssues({ issues: modelIssues } as z.ZodError, raw.model, modelList, ["model"]);
    for (const iss of other) if (!list.add(formatPath(iss.path), iss.message)) break;
    for (const iss of modelList.items) if (!list.add(iss.path, iss.message)) break;
    list.truncated ||= modelList.truncated;
    return { ok: false, error: errorBody(list, "request") };
  }
  const modelList = new IssueList("model");
  const model = validateSemantics(shape.data.model, modelList, notes, shape.data.normalize === true);
  if (modelList.items.length > 0) {
    modelList.items.forEach((i) => list.add(i.path, i.message));
    list.truncated ||= modelList.truncated;
    return { ok: false, error: errorBody(list, "request") };
  }
  return { ok: true, value: { ...shape.data, model }, notes };
}
