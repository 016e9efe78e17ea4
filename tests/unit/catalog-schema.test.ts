// catalog/schema.json is generated from the seed's zod schema and every catalogue file meets it,
// checked with a general-purpose JSON Schema validator (ajv, draft 2020-12).
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import Ajv2020 from "ajv/dist/2020";
import { describe, expect, it } from "vitest";
import { CATALOG_SCHEMA_ID, CATALOG_SCHEMA_PATH, catalogSchemaText } from "../../scripts/catalog-schema";

const catalogDir = path.dirname(CATALOG_SCHEMA_PATH);
const committed = readFileSync(CATALOG_SCHEMA_PATH, "utf8");
const schema = JSON.parse(committed);
// Formats are not checked by ajv itself (no ajv-formats); the generated date pattern carries the rule.
const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true, validateFormats: false }).compile(schema);
const modelFiles = readdirSync(catalogDir)
  .filter((n) => n.endsWith(".json") && n !== "schema.json")
  .sort();

function read(name: string): Record<string, unknown> {
  return JSON.parse(readFileSync(path.join(catalogDir, name), "utf8"));
}

describe("catalog/schema.json", () => {
  it("is what scripts/catalog-schema.ts generates now (run `npm run catalog:schema` and commit)", () => {
    expect(committed).toBe(catalogSchemaText());
  });

  it("declares draft 2020-12, its $id, a title and a description", () => {
    expect(schema.$schema).toBe("https://json-schema.org/draft/2020-12/schema");
    expect(schema.$id).toBe(CATALOG_SCHEMA_ID);
    expect(schema.title).toMatch(/catalogue file/);
    expect(typeof schema.description).toBe("string");
  });

  it("covers the five families' parameters", () => {
    const branches = schema.properties.editions.items.properties.params.oneOf as { properties: { family: { const: string } } }[];
    expect(branches.map((b) => b.properties.family.const).sort()).toEqual(["graph-walk", "hidden", "iid", "markov", "two-state"]);
  });
});

describe("every catalogue file meets the schema", () => {
  it("finds the 36 seed models", () => {
    expect(modelFiles).toHaveLength(36);
  });
  for (const name of modelFiles) {
    it(name, () => {
      const ok = validate(read(name));
      expect(ok, JSON.stringify(validate.errors?.slice(0, 3))).toBe(true);
    });
  }
});

describe("the schema refuses malformed files", () => {
  const good = read(modelFiles[0]);
  const firstParams = () => (good.editions as { params: Record<string, unknown> }[])[0].params;
  const cases: [string, Record<string, unknown>][] = [
    ["an unknown family", { ...good, family: "renewal" }],
    ["a slug that is not kebab-case", { ...good, slug: "Buoy_K05" }],
    ["no editions", { ...good, editions: [] }],
    ["a date that is not a calendar date", { ...good, editions: [{ ...(good.editions as object[])[0], publishedAt: "2026-02-30" }] }],
    ["a parameter field the engine does not know", { ...good, editions: [{ ...(good.editions as object[])[0], params: { ...firstParams(), extra: 1 } }] }],
    ["a missing title", Object.fromEntries(Object.entries(good).filter(([k]) => k !== "title"))],
  ];
  for (const [what, file] of cases) {
    it(`refuses ${what}`, () => {
      expect(validate(file)).toBe(false);
    });
  }
  it("refuses a probability given as a string", () => {
    const file = { ...good, family: "iid", editions: [{ note: "n", publishedAt: "2026-01-01", params: { family: "iid", alphabet: ["0", "1"], p: ["0.5", 0.5] } }] };
    expect(validate(file)).toBe(false);
    const fixed = { ...file, editions: [{ ...file.editions[0], params: { family: "iid", alphabet: ["0", "1"], p: [0.5, 0.5] } }] };
    expect(validate(fixed), JSON.stringify(validate.errors)).toBe(true);
  });
});
