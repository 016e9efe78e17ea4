/**
 * The editors' working copy of a model: the parameter format with labels as text and entries that
 * may still be unparsed text (see Cell). Converting back gives the JSON the engine validates.
 */
import type { Family, ModelParams } from "~/engine";
import type { Cell } from "./grid-ops";

export interface IidDraft { family: "iid"; alphabet: string[]; p: Cell[] }
export interface MarkovDraft { family: "markov"; alphabet: string[]; order: number; P: Cell[][] }
export interface TwoStateDraft { family: "two-state"; alphabet: string[]; a: Cell; b: Cell }
export interface GraphDraft { family: "graph-walk"; nodes: string[]; edges: [string, string, Cell][] }
export interface HiddenDraft { family: "hidden"; states: string[]; alphabet: string[]; P: Cell[][]; B: Cell[][] }
/** A model the grid editors cannot show (a sparse transition list, or too many states): edited as JSON text. */
export interface JsonDraft { family: Family; json: string; asJson: true }

export type Draft = IidDraft | MarkovDraft | TwoStateDraft | GraphDraft | HiddenDraft | JsonDraft;

/** Largest dense matrix the grid editors show (rows × columns of one matrix). */
export const GRID_CELL_LIMIT = 64 * 64;

const labels = (xs: readonly (string | number)[]) => xs.map((x) => String(x));
const rows = (M: readonly (readonly number[])[]) => M.map((r) => r.slice() as Cell[]);

/** The working copy of validated (or stored) parameters. */
export function draftFromParams(m: ModelParams): Draft {
  switch (m.family) {
    case "iid":
      return { family: "iid", alphabet: labels(m.alphabet), p: m.p.slice() };
    case "two-state":
      return { family: "two-state", alphabet: labels(m.alphabet), a: m.a, b: m.b };
    case "graph-walk":
      if (m.edges.length > 2000) return { family: m.family, json: JSON.stringify(m, null, 2), asJson: true };
      return { family: "graph-walk", nodes: labels(m.nodes), edges: m.edges.map(([u, v, w]) => [String(u), String(v), w]) };
    case "hidden":
      return { family: "hidden", states: labels(m.states), alphabet: labels(m.alphabet), P: rows(m.P), B: rows(m.B) };
    case "markov": {
      const order = m.order ?? 1;
      if (!m.P || m.alphabet.length ** order * m.alphabet.length > GRID_CELL_LIMIT) {
        return { family: m.family, json: JSON.stringify(m, null, 2), asJson: true };
      }
      return { family: "markov", alphabet: labels(m.alphabet), order, P: rows(m.P) };
    }
  }
}

/** The JSON the engine sees; a JSON draft that does not parse yields its text, which the engine rejects by name. */
export function paramsFromDraft(d: Draft): unknown {
  if ("asJson" in d) {
    try {
      return JSON.parse(d.json) as unknown;
    } catch {
      return d.json;
    }
  }
  return d;
}

/** Number of chain states the preview would solve for (contexts for order k, nodes for a walk). */
export function stateCount(d: Draft): number {
  if ("asJson" in d) return Infinity;
  switch (d.family) {
    case "iid":
      return d.alphabet.length;
    case "two-state":
      return 2;
    case "graph-walk":
      return d.nodes.length;
    case "hidden":
      return d.states.length;
    case "markov":
      return d.alphabet.length ** d.order;
  }
}
