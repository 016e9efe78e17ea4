/**
 * Parameters of the five model families and of a compute request, as zod 4 schemas. This is the one
 * shared, client-safe description of the parameter format (API, catalog loader, editors): no node
 * imports. The schemas check shape and JSON types; `parseModel` in validate.ts adds the
 * probability rules (row sums, negatives, dimensions, unknown nodes) with messages in the user's words.
 *
 * Large numeric arrays are checked by plain loops inside one refinement rather than one zod schema per
 * cell: a 4,096 × 4,096 matrix or 2,000,000 edges would otherwise take seconds to parse.
 */
import { z } from "zod";

/** Size limits; each message that enforces one names it. */
export const LIMITS = {
  /** States of a dense chain, counting |A|^k contexts of an order-k chain. */
  denseStates: 4096,
  /** Symbols of an i.i.d. source. */
  iidSymbols: 4096,
  /** Alphabet of a chain given by sparse transitions. */
  sparseStates: 1_000_000,
  /** Nodes of a weighted graph. */
  graphNodes: 1_000_000,
  /** Edges of a graph, or entries of a sparse transition list. */
  edges: 2_000_000,
  /** Hidden states of a hidden Markov source. */
  hiddenStates: 256,
  /** Output symbols of a hidden Markov source. */
  hiddenSymbols: 64,
  /** Longest chain order accepted (|A|^k is limited separately). */
  order: 12,
  /** Requested Rényi orders. */
  renyiOrders: 32,
  /** Longest block length for block entropies / hidden-source bounds. */
  blockLengths: 64,
  /** Characters in a state or symbol label. */
  labelLength: 200,
  /** Issues collected before validation stops looking. */
  issues: 50,
} as const;

/** The five families, in the trade's names. */
export const FAMILIES = ["iid", "markov", "two-state", "graph-walk", "hidden"] as const;
export type Family = (typeof FAMILIES)[number];

/** A state, symbol or node label: a non-empty string or a finite number (compared as text). */
export type Label = string | number;

/** Thousands separators without locale dependence (messages must be deterministic). */
export function formatCount(n: number): string {
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ",");
}

/** How a bad JSON value is named in a message: `"0.5" (a string)`, `null`, `an object`. */
export function describeValue(v: unknown): string {
  if (v === undefined) return "nothing";
  if (v === null) return "null";
  if (typeof v === "string") return `${JSON.stringify(v.length > 40 ? v.slice(0, 40) + "…" : v)} (a string)`;
  if (typeof v === "number") return String(v);
  if (typeof v === "boolean") return `${v} (a boolean)`;
  if (Array.isArray(v)) return "an array";
  return "an object";
}

type Ctx = z.core.$RefinementCtx<unknown>;

function missingOr(name: string, what: string) {
  return (iss: { input?: unknown }) =>
    iss.input === undefined ? `${name} is missing` : `${name} must be ${what}; got ${describeValue(iss.input)}`;
}

function isFiniteNumber(v: unknown): v is number {
  return typeof v === "number" && Number.isFinite(v);
}

function labelProblem(v: unknown): string | null {
  if (typeof v === "string") {
    if (v.length === 0) return "is an empty label";
    if (v.length > LIMITS.labelLength) return `is longer than ${LIMITS.labelLength} characters`;
    return null;
  }
  if (isFiniteNumber(v)) return null;
  return `is not a label (a string or a number); got ${describeValue(v)}`;
}

/** Adds at most LIMITS.issues issues per field; returns false once the cap is reached. */
function adder(ctx: Ctx) {
  let count = 0;
  return (path: (string | number)[], message: string): boolean => {
    if (count >= LIMITS.issues) {
      // One marker past the cap tells the collector that issues were left out.
      if (count === LIMITS.issues) ctx.addIssue({ code: "custom", path: [], message: "further problems were not listed" });
      count++;
      return false;
    }
    count++;
    ctx.addIssue({ code: "custom", path, message });
    return true;
  };
}

function tooMany(name: string, what: string, limit: number, got: number): string {
  return `${name} has ${formatCount(got)} ${what}; the limit is ${formatCount(limit)}`;
}

/** A list of labels with at least `min` entries and at most `max`. */
function labelList(name: string, max: number, min = 1) {
  return z
    .custom<Label[]>((v) => Array.isArray(v), { error: missingOr(name, "an array of labels") })
    .superRefine((arr, ctx) => {
      const add = adder(ctx);
      if (arr.length < min) add([], `${name} needs at least ${min} ${min === 1 ? "entry" : "entries"}; got ${arr.length}`);
      if (arr.length > max) {
        add([], tooMany(name, "entries", max, arr.length));
        return;
      }
      for (let i = 0; i < arr.length; i++) {
        const p = labelProblem(arr[i]);
        if (p && !add([i], `${name}[${i}] ${p}`)) return;
      }
    });
}

/** A list of finite JSON numbers. */
function numberVector(name: string, max: number) {
  return z
    .custom<number[]>((v) => Array.isArray(v), { error: missingOr(name, "an array of numbers") })
    .superRefine((arr, ctx) => {
      const add = adder(ctx);
      if (arr.length > max) {
        add([], tooMany(name, "entries", max, arr.length));
        return;
      }
      for (let i = 0; i < arr.length; i++) {
        if (!isFiniteNumber(arr[i]) && !add([i], `${name}[${i}] is not a finite number; got ${describeValue(arr[i])}`)) return;
      }
    });
}

/** A list of rows of finite JSON numbers (dimensions are checked against the model in validate.ts). */
function numberMatrix(name: string, maxRows: number, maxCols: number) {
  return z
    .custom<number[][]>((v) => Array.isArray(v), { error: missingOr(name, "an array of rows") })
    .superRefine((rows, ctx) => {
      const add = adder(ctx);
      if (rows.length > maxRows) {
        add([], tooMany(name, "rows", maxRows, rows.length));
        return;
      }
      for (let i = 0; i < rows.length; i++) {
        const row = rows[i] as unknown;
        if (!Array.isArray(row)) {
          if (!add([i], `${name}[${i}] must be a row (an array of numbers); got ${describeValue(row)}`)) return;
          continue;
        }
        if (row.length > maxCols) {
          if (!add([i], tooMany(`${name}[${i}]`, "entries", maxCols, row.length))) return;
          continue;
        }
        for (let j = 0; j < row.length; j++) {
          const v = row[j] as unknown;
          if (!isFiniteNumber(v) && !add([i, j], `${name}[${i}][${j}] is not a finite number; got ${describeValue(v)}`)) return;
        }
      }
    });
}

/** `[[u, v, w], …]`: u, v labels, w a finite number. */
function edgeList(name: string, max: number) {
  return z
    .custom<[Label, Label, number][]>((v) => Array.isArray(v), { error: missingOr(name, "an array of [u, v, w] triples") })
    .superRefine((arr, ctx) => {
      const add = adder(ctx);
      if (arr.length > max) {
        add([], tooMany(name, "entries", max, arr.length));
        return;
      }
      for (let i = 0; i < arr.length; i++) {
        const e = arr[i] as unknown;
        if (!Array.isArray(e) || e.length !== 3) {
          if (!add([i], `edge ${i} must be [u, v, w]; got ${Array.isArray(e) ? `${e.length} entries` : describeValue(e)}`)) return;
          continue;
        }
        for (let k = 0; k < 2; k++) {
          const p = labelProblem(e[k]);
          if (p && !add([i, k], `edge ${i}: its ${k === 0 ? "first" : "second"} node ${p}`)) return;
        }
        if (!isFiniteNumber(e[2]) && !add([i, 2], `edge ${i}: its weight is not a finite number; got ${describeValue(e[2])}`)) return;
      }
    });
}

/** `[[i, j, p], …]`: i, j integer indices into the alphabet, p a finite number. */
function transitionList(name: string, max: number) {
  return z
    .custom<[number, number, number][]>((v) => Array.isArray(v), {
      error: missingOr(name, "an array of [i, j, p] triples"),
    })
    .superRefine((arr, ctx) => {
      const add = adder(ctx);
      if (arr.length > max) {
        add([], tooMany(name, "entries", max, arr.length));
        return;
      }
      for (let t = 0; t < arr.length; t++) {
        const e = arr[t] as unknown;
        if (!Array.isArray(e) || e.length !== 3) {
          if (!add([t], `transition ${t} must be [i, j, p]; got ${Array.isArray(e) ? `${e.length} entries` : describeValue(e)}`)) return;
          continue;
        }
        for (let k = 0; k < 2; k++) {
          if (!Number.isInteger(e[k]) || (e[k] as number) < 0) {
            if (!add([t, k], `transition ${t}: ${k === 0 ? "i" : "j"} must be a state index (an integer ≥ 0); got ${describeValue(e[k])}`)) return;
          }
        }
        if (!isFiniteNumber(e[2]) && !add([t, 2], `transition ${t}: p is not a finite number; got ${describeValue(e[2])}`)) return;
      }
    });
}

function finiteNumber(name: string) {
  return z.custom<number>((v) => isFiniteNumber(v), { error: missingOr(name, "a finite number") });
}

const familyLiteral = <F extends Family>(f: F) => z.literal(f);

/** `{ family: "iid", alphabet, p }`. */
export const iidParamsSchema = z.strictObject({
  family: familyLiteral("iid"),
  alphabet: labelList("alphabet", LIMITS.iidSymbols),
  p: numberVector("p", LIMITS.iidSymbols),
});

/**
 * `{ family: "markov", alphabet, order, P }` with |A|^k rows in lexicographic context order, or, for
 * order 1, `transitions: [[i, j, p], …]` instead of `P` (decision note 0003).
 */
export const markovParamsSchema = z.strictObject({
  family: familyLiteral("markov"),
  alphabet: labelList("alphabet", LIMITS.sparseStates),
  order: z
    .custom<number>((v) => Number.isInteger(v) && (v as number) >= 1 && (v as number) <= LIMITS.order, {
      error: missingOr("order", `an integer from 1 to ${LIMITS.order}`),
    })
    .optional(),
  P: numberMatrix("P", LIMITS.denseStates, LIMITS.denseStates).optional(),
  transitions: transitionList("transitions", LIMITS.edges).optional(),
});

/** `{ family: "two-state", alphabet: [s0, s1], a: P(s0→s1), b: P(s1→s0) }`. */
export const twoStateParamsSchema = z.strictObject({
  family: familyLiteral("two-state"),
  alphabet: labelList("alphabet", 2, 2),
  a: finiteNumber("a"),
  b: finiteNumber("b"),
});

/** `{ family: "graph-walk", nodes, edges: [[u, v, w], …] }`, undirected; a self-loop adds w once. */
export const graphWalkParamsSchema = z.strictObject({
  family: familyLiteral("graph-walk"),
  nodes: labelList("nodes", LIMITS.graphNodes),
  edges: edgeList("edges", LIMITS.edges),
});

/** `{ family: "hidden", states, alphabet, P, B }` with B[state][symbol]. */
export const hiddenParamsSchema = z.strictObject({
  family: familyLiteral("hidden"),
  states: labelList("states", LIMITS.hiddenStates),
  alphabet: labelList("alphabet", LIMITS.hiddenSymbols),
  P: numberMatrix("P", LIMITS.hiddenStates, LIMITS.hiddenStates),
  B: numberMatrix("B", LIMITS.hiddenStates, LIMITS.hiddenSymbols),
});

/** Any model's parameters, discriminated by `family`. */
export const modelParamsSchema = z.discriminatedUnion("family", [
  iidParamsSchema,
  markovParamsSchema,
  twoStateParamsSchema,
  graphWalkParamsSchema,
  hiddenParamsSchema,
]);

export type IidParams = z.infer<typeof iidParamsSchema>;
export type MarkovParams = z.infer<typeof markovParamsSchema>;
export type TwoStateParams = z.infer<typeof twoStateParamsSchema>;
export type GraphWalkParams = z.infer<typeof graphWalkParamsSchema>;
export type HiddenParams = z.infer<typeof hiddenParamsSchema>;
export type ModelParams = z.infer<typeof modelParamsSchema>;

/** Rényi orders: at most 32, each finite, > 0 and ≠ 1 (order 1 is the Shannon rate itself). */
export const renyiOrdersSchema = numberVector("renyiOrders", LIMITS.renyiOrders).superRefine((orders, ctx) => {
  for (let i = 0; i < orders.length; i++) {
    const a = orders[i];
    if (!isFiniteNumber(a)) continue;
    if (a <= 0) ctx.addIssue({ code: "custom", path: [i], message: `renyiOrders[${i}] must be > 0; got ${a}` });
    else if (a === 1)
      ctx.addIssue({ code: "custom", path: [i], message: `renyiOrders[${i}] is 1, which is the Shannon rate itself; use an order ≠ 1` });
  }
});

/** `{ model, renyiOrders?, blockLengths?, normalize?, seed? }`; unknown top-level fields are ignored. */
export const computeRequestSchema = z.object({
  model: z.custom<unknown>((v) => v !== undefined, { error: "model is missing" }).pipe(modelParamsSchema),
  renyiOrders: renyiOrdersSchema.optional(),
  blockLengths: z
    .custom<number>((v) => Number.isInteger(v) && (v as number) >= 1 && (v as number) <= LIMITS.blockLengths, {
      error: missingOr("blockLengths", `an integer from 1 to ${LIMITS.blockLengths} (the limit)`),
    })
    .optional(),
  normalize: z.custom<boolean>((v) => typeof v === "boolean", { error: missingOr("normalize", "true or false") }).optional(),
  seed: z
    .custom<number>((v) => Number.isSafeInteger(v), { error: missingOr("seed", "an integer") })
    .optional(),
});

export type ComputeRequest = z.infer<typeof computeRequestSchema>;
