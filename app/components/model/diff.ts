/**
 * What changed between two editions of a model: parameter by parameter and figure by figure.
 * Pure and client-safe (no React, no database): the model page's loader runs it on the server and
 * sends the result, and the unit tests call it directly.
 */
import type { ComputeResult } from "~/engine/compute";
import { contextLabels } from "~/engine/lift";
import type { Label, ModelParams } from "~/engine/schema";

/** One named parameter value: a matrix cell, a probability, an edge weight or a scalar. */
export interface ParamCell {
  /** Stable identity across editions, e.g. `P|calm·swell|storm`, `edge|a|b`, `a`. */
  key: string;
  /** Which table of the page the cell belongs to. */
  table: "p" | "P" | "B" | "edges" | "scalar";
  /** Row label as printed (context, state, symbol, "u – v", or the scalar's name). */
  row: string;
  /** Column label as printed (next symbol, next state, emitted symbol, "w", "value"). */
  col: string;
  value: number;
}

/** One parameter that differs between two editions. */
export interface ParamChange {
  key: string;
  table: ParamCell["table"];
  row: string;
  col: string;
  kind: "changed" | "added" | "removed";
  from: number | null;
  to: number | null;
  /** to − from, when both exist. */
  delta: number | null;
}

/** The parameter side of a diff. */
export interface ParamDiff {
  /** Same family and the same labels (alphabet, order, states, nodes): the cells line up one to one. */
  sameStructure: boolean;
  /** What changed in the structure itself, in words ("the order changed from 1 to 2"). */
  structure: string[];
  changes: ParamChange[];
  /** Cells present in both editions with the same value. */
  unchanged: number;
}

/** One figure compared between two editions. Rates are in bits per symbol; probabilities are unitless. */
export interface FigureDelta {
  key: string;
  /** Human name: "Entropy rate", "Rényi rate, α = 2", "Stationary probability of calm". */
  figure: string;
  kind: "rate" | "probability";
  from: number | null;
  to: number | null;
  delta: number | null;
  changed: boolean;
}

/** The whole comparison of edition `from` with edition `to`. */
export interface EditionDiff {
  from: number;
  to: number;
  params: ParamDiff;
  figures: FigureDelta[];
}

/** Figures that agree this closely are the same figure (rounding, not a change of model). */
export const FIGURE_SAME_TOLERANCE = 1e-12;

function text(l: Label): string {
  return typeof l === "number" ? String(l) : l;
}

/** Undirected edge identity: the two node labels in a fixed order. */
function edgeKey(u: string, v: string): [string, string] {
  return u <= v ? [u, v] : [v, u];
}

/**
 * Every parameter of a model as named cells, in the order the page prints them. Order-k Markov rows
 * are labelled by their context ("a·b", oldest symbol first). O(number of parameters).
 */
export function paramCells(params: ModelParams): ParamCell[] {
  const out: ParamCell[] = [];
  switch (params.family) {
    case "iid": {
      params.alphabet.forEach((s, i) => {
        const row = text(s);
        out.push({ key: `p|${row}`, table: "p", row, col: "p", value: params.p[i] });
      });
      break;
    }
    case "markov": {
      const symbols = params.alphabet.map(text);
      if (params.transitions) {
        for (const [i, j, p] of params.transitions) {
          const row = symbols[i] ?? String(i);
          const col = symbols[j] ?? String(j);
          out.push({ key: `P|${row}|${col}`, table: "P", row, col, value: p });
        }
      } else if (params.P) {
        const rows = contextLabels(symbols, params.order ?? 1);
        params.P.forEach((r, i) =>
          r.forEach((p, j) => {
            const row = rows[i] ?? String(i);
            const col = symbols[j] ?? String(j);
            out.push({ key: `P|${row}|${col}`, table: "P", row, col, value: p });
          }),
        );
      }
      break;
    }
    case "two-state": {
      const [s0, s1] = params.alphabet.map(text);
      out.push({ key: "a", table: "scalar", row: `a = P(${s0} → ${s1})`, col: "value", value: params.a });
      out.push({ key: "b", table: "scalar", row: `b = P(${s1} → ${s0})`, col: "value", value: params.b });
      break;
    }
    case "graph-walk": {
      for (const [u0, v0, w] of params.edges) {
        const [u, v] = edgeKey(text(u0), text(v0));
        out.push({ key: `edge|${u}|${v}`, table: "edges", row: u === v ? `${u} (self-loop)` : `${u} – ${v}`, col: "w", value: w });
      }
      break;
    }
    case "hidden": {
      const states = params.states.map(text);
      const symbols = params.alphabet.map(text);
      params.P.forEach((r, i) => r.forEach((p, j) => out.push({ key: `P|${states[i]}|${states[j]}`, table: "P", row: states[i], col: states[j], value: p })));
      params.B.forEach((r, i) => r.forEach((p, y) => out.push({ key: `B|${states[i]}|${symbols[y]}`, table: "B", row: states[i], col: symbols[y], value: p })));
      break;
    }
  }
  return out;
}

function labelsOf(params: ModelParams): { name: string; labels: string[] }[] {
  switch (params.family) {
    case "iid":
    case "two-state":
      return [{ name: "alphabet", labels: params.alphabet.map(text) }];
    case "markov":
      return [{ name: "alphabet", labels: params.alphabet.map(text) }];
    case "graph-walk":
      return [{ name: "nodes", labels: params.nodes.map(text) }];
    case "hidden":
      return [
        { name: "hidden states", labels: params.states.map(text) },
        { name: "alphabet", labels: params.alphabet.map(text) },
      ];
  }
}

function listDifference(name: string, a: string[], b: string[]): string | null {
  if (a.length === b.length && a.every((x, i) => x === b[i])) return null;
  const added = b.filter((x) => !a.includes(x));
  const removed = a.filter((x) => !b.includes(x));
  const parts: string[] = [];
  if (added.length) parts.push(`added ${added.join(", ")}`);
  if (removed.length) parts.push(`removed ${removed.join(", ")}`);
  if (!parts.length) parts.push("reordered");
  return `the ${name} changed: ${parts.join("; ")}`;
}

/**
 * Parameter-by-parameter comparison. Cells are matched by their labels, so a reordered alphabet
 * still compares the right probabilities; values are compared exactly (parameters are given numbers,
 * not computed ones). O(cells).
 */
export function diffParams(from: ModelParams, to: ModelParams): ParamDiff {
  const structure: string[] = [];
  if (from.family !== to.family) structure.push(`the family changed from ${from.family} to ${to.family}`);
  else {
    const la = labelsOf(from);
    const lb = labelsOf(to);
    la.forEach((l, i) => {
      const d = listDifference(l.name, l.labels, lb[i].labels);
      if (d) structure.push(d);
    });
    if (from.family === "markov" && to.family === "markov" && (from.order ?? 1) !== (to.order ?? 1)) {
      structure.push(`the order changed from ${from.order ?? 1} to ${to.order ?? 1}`);
    }
  }
  const a = new Map(paramCells(from).map((c) => [c.key, c]));
  const b = paramCells(to);
  const changes: ParamChange[] = [];
  let unchanged = 0;
  const seen = new Set<string>();
  for (const cell of b) {
    seen.add(cell.key);
    const old = a.get(cell.key);
    const base = { key: cell.key, table: cell.table, row: cell.row, col: cell.col };
    if (!old) changes.push({ ...base, kind: "added", from: null, to: cell.value, delta: null });
    else if (old.value !== cell.value) changes.push({ ...base, kind: "changed", from: old.value, to: cell.value, delta: cell.value - old.value });
    else unchanged++;
  }
  for (const [key, old] of a) {
    if (!seen.has(key)) changes.push({ key, table: old.table, row: old.row, col: old.col, kind: "removed", from: old.value, to: null, delta: null });
  }
  return { sameStructure: structure.length === 0, structure, changes, unchanged };
}

function delta(key: string, figure: string, kind: FigureDelta["kind"], a: number | null | undefined, b: number | null | undefined): FigureDelta {
  const from = typeof a === "number" && Number.isFinite(a) ? a : null;
  const to = typeof b === "number" && Number.isFinite(b) ? b : null;
  const d = from !== null && to !== null ? to - from : null;
  const changed =
    from === null || to === null ? from !== to : Math.abs(d!) > FIGURE_SAME_TOLERANCE * Math.max(1, Math.abs(from), Math.abs(to));
  return { key, figure, kind, from, to, delta: d, changed };
}

/**
 * Figure-by-figure comparison of two stored results: entropy rate, min-entropy rate, each Rényi
 * order either edition reports, and the stationary probability of each state (matched by label).
 * A figure missing on one side (none for a hidden source's min-entropy) is null there. O(states + orders).
 */
export function diffFigures(from: ComputeResult, to: ComputeResult): FigureDelta[] {
  const out: FigureDelta[] = [
    delta("entropyRate", "Entropy rate", "rate", from.entropyRate?.bits, to.entropyRate?.bits),
    delta("minEntropyRate", "Min-entropy rate", "rate", from.minEntropyRate?.bits, to.minEntropyRate?.bits),
  ];
  const orders = [...new Set([...from.renyi.map((r) => r.order), ...to.renyi.map((r) => r.order)])].sort((x, y) => x - y);
  for (const order of orders) {
    out.push(
      delta(
        `renyi:${order}`,
        `Rényi rate, α = ${order}`,
        "rate",
        from.renyi.find((r) => r.order === order)?.bits,
        to.renyi.find((r) => r.order === order)?.bits,
      ),
    );
  }
  const prob = (r: ComputeResult) => new Map(r.states.map((s, i) => [s, r.stationary ? r.stationary[i] : null]));
  const pa = prob(from);
  const pb = prob(to);
  const states = [...to.states, ...from.states.filter((s) => !pb.has(s))];
  for (const s of states) out.push(delta(`stationary:${s}`, `Stationary probability of ${s}`, "probability", pa.get(s), pb.get(s)));
  return out;
}

/** Both sides of the comparison of two editions. */
export function diffEditions(
  from: { number: number; params: ModelParams; figures: ComputeResult },
  to: { number: number; params: ModelParams; figures: ComputeResult },
): EditionDiff {
  return { from: from.number, to: to.number, params: diffParams(from.params, to.params), figures: diffFigures(from.figures, to.figures) };
}
