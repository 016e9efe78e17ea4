/**
 * Sensitivity: the entropy rate over a grid of one parameter. For a transition-matrix entry,
 * Pᵣ꜀ = x and the other entries of row r are rescaled proportionally so the row still sums to 1
 * (the relative odds of the other successors are kept); if they were all 0, the remainder 1 − x is
 * spread evenly over them. The same rule applies to one probability of an i.i.d. source.
 */
import { EngineInputError } from "./errors";
import { parseModel } from "./validate";
import type { ModelParams } from "./schema";
import { classMatrix, prepareChain, solveStationary } from "./compute";
import { classify } from "./classify";
import { entropyRateGeneral, entropyRateIid, entropyRateTwoState } from "./entropy-rate";

/** Which parameter to vary. */
export type SweepParameter =
  | { kind: "two-state"; name: "a" | "b" }
  | { kind: "entry"; row: number; col: number }
  | { kind: "iid"; index: number };

/** Sweep grid: `steps` points from `from` to `to` inclusive (one point when steps = 1). */
export interface SweepOptions {
  parameter: SweepParameter;
  from: number;
  to: number;
  steps: number;
}

/** One point; `bits` is null (with a reason) where there is no single entropy rate. */
export interface SweepPoint {
  x: number;
  bits: number | null;
  reason?: string;
}

/** Most points in one sweep. */
export const MAX_SWEEP_STEPS = 201;

/** Sets entry `col` of a probability row to x, rescaling the rest proportionally. O(row). */
export function setProbability(row: readonly number[], col: number, x: number): number[] {
  const rest = 1 - row[col];
  const out = row.slice();
  out[col] = x;
  const others = row.length - 1;
  for (let j = 0; j < row.length; j++) {
    if (j === col) continue;
    out[j] = rest > 0 ? (row[j] * (1 - x)) / rest : others > 0 ? (1 - x) / others : 0;
  }
  return out;
}

function fail(message: string, path: string): never {
  throw new EngineInputError(message, [{ path, message }]);
}

function withParameter(m: ModelParams, p: SweepParameter, x: number): ModelParams {
  switch (p.kind) {
    case "two-state":
      if (m.family !== "two-state") fail(`a "two-state" sweep needs a two-state model, not ${m.family}`, "parameter.kind");
      return { ...m, [p.name]: x };
    case "iid":
      if (m.family !== "iid") fail(`an "iid" sweep needs an i.i.d. model, not ${m.family}`, "parameter.kind");
      return { ...m, p: setProbability(m.p, p.index, x) };
    case "entry": {
      if (m.family !== "markov" || !m.P) fail(`an "entry" sweep needs a Markov chain given by P`, "parameter.kind");
      const P = m.P.slice();
      P[p.row] = setProbability(P[p.row], p.col, x);
      return { ...m, P };
    }
  }
}

/** The entropy rate in bits of a validated model, or null with the reason. */
function rateOrReason(m: ModelParams): { bits: number | null; reason?: string } {
  if (m.family === "iid") return { bits: entropyRateIid(m.p).bits };
  if (m.family === "two-state" && m.a + m.b > 0) return { bits: entropyRateTwoState(m.a, m.b).rate.bits };
  const { chain } = prepareChain(m);
  const c = classify(chain.sparse);
  if (c.closedClasses.length > 1) {
    return { bits: null, reason: `${c.closedClasses.length} closed classes: the entropy rate depends on the initial distribution` };
  }
  const states = c.classes[c.closedClasses[0]];
  const M = classMatrix(chain, states);
  return { bits: entropyRateGeneral(M, solveStationary(M).mu).bits };
}

/**
 * The entropy rate (bits/symbol) at `steps` evenly spaced values of one parameter. Each point costs
 * one stationary solve of the model. Throws EngineInputError for an invalid model, a parameter that
 * does not fit the family or is out of range, x outside [0, 1] or more than MAX_SWEEP_STEPS steps.
 * A point whose chain has several closed classes (or that a solver rejects) gets bits null and a reason.
 */
export function sweepEntropyRate(model: unknown, opts: SweepOptions): { parameter: SweepParameter; points: SweepPoint[] } {
  const parsed = parseModel(model);
  if (!parsed.ok) throw new EngineInputError(parsed.error.message, parsed.error.issues);
  const m = parsed.value;
  const { parameter: p, from, to, steps } = opts;
  if (!Number.isInteger(steps) || steps < 1 || steps > MAX_SWEEP_STEPS) fail(`steps must be an integer from 1 to ${MAX_SWEEP_STEPS}; got ${steps}`, "steps");
  for (const [name, v] of [["from", from], ["to", to]] as const) {
    if (typeof v !== "number" || !Number.isFinite(v) || v < 0 || v > 1) fail(`${name} must be a probability in [0, 1]; got ${String(v)}`, name);
  }
  if (p.kind === "iid" && m.family === "iid" && !(Number.isInteger(p.index) && p.index >= 0 && p.index < m.p.length)) {
    fail(`index ${p.index} is not a symbol of this source (0 to ${m.p.length - 1})`, "parameter.index");
  }
  if (p.kind === "entry" && m.family === "markov" && m.P) {
    if (!(Number.isInteger(p.row) && p.row >= 0 && p.row < m.P.length)) fail(`row ${p.row} is not a row of P (0 to ${m.P.length - 1})`, "parameter.row");
    if (!(Number.isInteger(p.col) && p.col >= 0 && p.col < m.alphabet.length)) fail(`col ${p.col} is not a column of P (0 to ${m.alphabet.length - 1})`, "parameter.col");
  }
  if (p.kind === "two-state" && p.name !== "a" && p.name !== "b") fail(`name must be "a" or "b"`, "parameter.name");
  const points: SweepPoint[] = [];
  for (let i = 0; i < steps; i++) {
    const x = steps === 1 ? from : i === steps - 1 ? to : from + ((to - from) * i) / (steps - 1);
    const varied = parseModel(withParameter(m, p, x));
    if (!varied.ok) {
      points.push({ x, bits: null, reason: varied.error.message });
      continue;
    }
    try {
      const r = rateOrReason(varied.value);
      points.push(r.bits !== null && Number.isFinite(r.bits) ? { x, bits: r.bits } : { x, bits: null, reason: r.reason ?? "no finite entropy rate" });
    } catch (e) {
      points.push({ x, bits: null, reason: e instanceof Error ? e.message : String(e) });
    }
  }
  return { parameter: p, points };
}
