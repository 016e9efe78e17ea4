/**
 * Writes catalog/schema.json, the JSON Schema (draft 2020-12) of one catalogue file, generated from
 * the zod schema the seed validates with (`catalogFileSchema`). Run `npm run catalog:schema` after
 * changing that schema or the engine's parameter schemas, and commit the result; a unit test fails
 * when the committed file differs from a fresh generation.
 *
 * The engine checks large numeric arrays with one refinement each (app/engine/schema.ts), which zod
 * cannot express in JSON Schema. Each of those fields is given its JSON shape here, keyed by the zod
 * schema object itself, so a new field the engine adds stops the generation instead of silently
 * becoming "anything". Probability rules (rows summing to 1, matrix dimensions, known node labels)
 * stay with the seed's own validation: JSON Schema only checks the shape.
 */
import { writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { z } from "zod";
import { catalogFileSchema } from "../app/.server/catalog.server";
import {
  graphWalkParamsSchema,
  hiddenParamsSchema,
  iidParamsSchema,
  LIMITS,
  markovParamsSchema,
  twoStateParamsSchema,
} from "../app/engine/schema";

type JsonSchema = Record<string, unknown>;

export const CATALOG_SCHEMA_ID = "urn:ergoshelf:schema:catalog-file";
export const CATALOG_SCHEMA_PATH = fileURLToPath(new URL("../catalog/schema.json", import.meta.url));

const label: JsonSchema = {
  anyOf: [{ type: "string", minLength: 1, maxLength: LIMITS.labelLength }, { type: "number" }],
  description: "A state, symbol or node label: a non-empty string or a number.",
};

function labels(description: string, max: number, min = 1): JsonSchema {
  return { type: "array", items: label, minItems: min, maxItems: max, description };
}

function numbers(description: string, max: number): JsonSchema {
  return { type: "array", items: { type: "number" }, maxItems: max, description };
}

function matrix(description: string, maxRows: number, maxCols: number): JsonSchema {
  return { type: "array", maxItems: maxRows, items: { type: "array", maxItems: maxCols, items: { type: "number" } }, description };
}

function triple(first: JsonSchema, second: JsonSchema, third: JsonSchema, description: string, max: number): JsonSchema {
  return {
    type: "array",
    maxItems: max,
    items: { type: "array", prefixItems: [first, second, third], minItems: 3, maxItems: 3, items: false },
    description,
  };
}

/** The inner schema of an optional field, else the field itself. */
function inner(schema: z.ZodType): z.ZodType {
  return schema instanceof z.ZodOptional ? (schema.unwrap() as z.ZodType) : schema;
}

const stateIndex: JsonSchema = { type: "integer", minimum: 0 };

/** JSON shapes of the engine fields that are refinements in zod. */
const refinedFieldList: [z.ZodType, JsonSchema][] = [
  [iidParamsSchema.shape.alphabet, labels("Symbols of the source.", LIMITS.iidSymbols)],
  [iidParamsSchema.shape.p, numbers("Probability of each symbol, in alphabet order; sums to 1.", LIMITS.iidSymbols)],
  [markovParamsSchema.shape.alphabet, labels("Symbols of the chain.", LIMITS.sparseStates)],
  [inner(markovParamsSchema.shape.order), { type: "integer", minimum: 1, maximum: LIMITS.order, description: "Order k of the chain (default 1)." }],
  [
    inner(markovParamsSchema.shape.P),
    matrix(
      "Transition matrix: |A|^k rows (contexts in lexicographic order, oldest symbol first) × |A| columns; each row sums to 1.",
      LIMITS.denseStates,
      LIMITS.denseStates,
    ),
  ],
  [
    inner(markovParamsSchema.shape.transitions),
    triple(stateIndex, stateIndex, { type: "number" }, "Order-1 chain given sparsely as [i, j, p] triples instead of P.", LIMITS.edges),
  ],
  [twoStateParamsSchema.shape.alphabet, labels("The two states [s0, s1].", 2, 2)],
  [twoStateParamsSchema.shape.a, { type: "number", description: "P(s0 → s1)." }],
  [twoStateParamsSchema.shape.b, { type: "number", description: "P(s1 → s0)." }],
  [graphWalkParamsSchema.shape.nodes, labels("Nodes of the graph.", LIMITS.graphNodes)],
  [graphWalkParamsSchema.shape.edges, triple(label, label, { type: "number" }, "Undirected edges [u, v, w] with weight w > 0.", LIMITS.edges)],
  [hiddenParamsSchema.shape.states, labels("Hidden states.", LIMITS.hiddenStates)],
  [hiddenParamsSchema.shape.alphabet, labels("Emitted symbols.", LIMITS.hiddenSymbols)],
  [hiddenParamsSchema.shape.P, matrix("Transition matrix of the hidden states; each row sums to 1.", LIMITS.hiddenStates, LIMITS.hiddenStates)],
  [hiddenParamsSchema.shape.B, matrix("Emission matrix B[state][symbol]; each row sums to 1.", LIMITS.hiddenStates, LIMITS.hiddenSymbols)],
];

/**
 * Keyed by the zod schema object and the objects it was derived from: adding a refinement
 * makes a new schema whose `parent` is the bare custom type, and the generator visits both.
 */
const refinedFields = new Map<unknown, JsonSchema>();
for (const [schema, shape] of refinedFieldList) {
  for (let s: { _zod: { parent?: unknown } } | undefined = schema; s; s = s._zod.parent as typeof s) refinedFields.set(s, shape);
}

/** The catalogue file's JSON Schema, generated from catalogFileSchema. Throws on a field it cannot express. */
export function catalogJsonSchema(): JsonSchema {
  const generated = z.toJSONSchema(catalogFileSchema, {
    target: "draft-2020-12",
    io: "input",
    reused: "inline",
    unrepresentable: ({ zodSchema, path: at }) => {
      const shape = refinedFields.get(zodSchema);
      if (!shape) throw new Error(`catalog schema: no JSON shape for the refined field at ${at.join(".")}`);
      return structuredClone(shape) as never;
    },
  }) as JsonSchema;
  const { $schema, ...rest } = generated;
  return {
    $schema,
    $id: CATALOG_SCHEMA_ID,
    title: "Ergoshelf catalogue file",
    description:
      "One model of the seed library (catalog/<slug>.json) with its editions, oldest first. Generated by scripts/catalog-schema.ts " +
      "from the schema the seed validates with; the seed also checks what JSON Schema cannot: probability rows sum to 1, matrix " +
      "dimensions, known node labels, the slug equals the file name, and every edition's figures pass verification.",
    ...rest,
  };
}

/** The file's text: 2-space JSON with a final newline. */
export function catalogSchemaText(): string {
  return JSON.stringify(catalogJsonSchema(), null, 2) + "\n";
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  writeFileSync(CATALOG_SCHEMA_PATH, catalogSchemaText());
  process.stdout.write(`wrote ${path.relative(process.cwd(), CATALOG_SCHEMA_PATH)}\n`);
}
