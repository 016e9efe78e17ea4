// Our citation files read back by general-purpose parsers and checked against the formats' own
// published rules:
// - BibTeX and RIS are parsed with citation.js (@citation-js/core 0.7.21 with plugin-bibtex and
//   plugin-ris), which turns both into CSL-JSON items.
// - RIS structure against the tag list of the "RIS Format Specifications" (Research Information
//   Systems; the 2011 reference-type and tag tables): `XX  - value` lines, TY first, ER last.
// - CSL-JSON against the CSL data schema, schemas/input/csl-data.json in the
//   citation-style-language/schema repository (required id and type, the type list, the
//   date-variable shape), validated with ajv.
// @ts-expect-error -- @citation-js/core ships no type declarations
import { Cite } from "@citation-js/core";
import "@citation-js/plugin-bibtex";
import "@citation-js/plugin-ris";
import Ajv from "ajv";
import { describe, expect, it } from "vitest";
import { bibtexKey, citationKey, toBibTeX, toCSL, toRIS, type CitationInput } from "~/citations";

interface ParsedItem {
  id: string;
  type: string;
  title?: string;
  URL?: string;
  note?: string;
  version?: string;
  edition?: string;
  abstract?: string;
  publisher?: string;
  author?: { literal?: string; family?: string }[];
  issued?: { "date-parts": number[][] };
  accessed?: { "date-parts": number[][] };
}

function parse(text: string): ParsedItem[] {
  return (new Cite(text) as { data: ParsedItem[] }).data;
}

const plain: CitationInput = {
  slug: "tide-surge-residual-24",
  title: "Brannock Point surge residual, 24 classes",
  edition: 3,
  family: "markov",
  summary: "Quantised surge residual at the Brannock Point tide gauge.",
  publishedAt: new Date("2026-06-09T12:00:00Z"),
  contentHash: "0123456789abcdef".repeat(4),
  engineVersion: "1.4.0",
  entropyRateBits: 3.141592653589,
  url: "https://ergoshelf.example/library/tide-surge-residual-24/e/3",
  accessed: "2026-07-01",
};

// Every TeX special character, non-ASCII letters and a dash, in one title.
const awkwardTitle = "Kelpmoor Ærø — 5% & $3 #2 a_b {x} ~tilde ^hat back\\slash, café";
const awkward: CitationInput = { ...plain, title: awkwardTitle, summary: "Über 50% of {frames} & more" };

describe("BibTeX read back by citation.js", () => {
  for (const [name, input] of [
    ["plain title", plain],
    ["title with TeX specials and non-ASCII", awkward],
  ] as const) {
    it(`keeps key, title, year, URL, version and note (${name})`, () => {
      const items = parse(toBibTeX(input));
      expect(items).toHaveLength(1);
      const item = items[0];
      expect(item.id).toBe(bibtexKey(input.slug, input.edition));
      expect(item.title).toBe(`${input.title}, edition ${input.edition}`);
      expect(item.issued?.["date-parts"][0].slice(0, 2)).toEqual([2026, 6]);
      expect(item.URL).toBe(input.url);
      expect(item.version).toBe(String(input.edition));
      expect(item.note).toContain(`Citation key ${citationKey(input.slug, input.edition)}.`);
      expect(item.note).toContain(input.contentHash);
      expect(item.note).toContain("3.141592654 bits/symbol");
      expect(item.abstract).toBe(input.summary);
      expect(item.accessed?.["date-parts"][0]).toEqual([2026, 7, 1]);
      expect(item.author?.[0]?.family ?? item.author?.[0]?.literal).toBe("Ergoshelf library");
    });
  }

  it("refuses a key with @ in it, which is why the BibTeX key differs from the citation key", () => {
    const withAt = toBibTeX(plain).replace(bibtexKey(plain.slug, plain.edition), citationKey(plain.slug, plain.edition));
    expect(() => parse(withAt)).toThrow();
  });
});

// Tags of the RIS Format Specifications tag table (including the legacy ID, Y2 and the
// A1–A4/T1–T3/U1–U5 families); our files must use only these.
const risTags = new Set(
  (
    "TY A1 A2 A3 A4 AB AD AN AU AV BT C1 C2 C3 C4 C5 C6 C7 C8 CA CN CP CT CY DA DB DO DP ED EP ET ID IS J1 J2 JA JF JO " +
    "KW L1 L2 L3 L4 LA LB LK M1 M2 M3 N1 N2 NV OP PB PP PY RI RN RP SE SN SP ST T1 T2 T3 TA TI TT U1 U2 U3 U4 U5 UR " +
    "VL VO Y1 Y2 ER"
  ).split(" "),
);
// Reference types of the same specification that fit a published model (DATA is "Data file").
const risTypes = new Set(["DATA", "DBASE", "GEN", "COMP", "ELEC"]);

describe("RIS", () => {
  const ris = toRIS(awkward);
  const lines = ris.split("\r\n").slice(0, -1);

  it("has only `XX  - value` lines with tags from the published list, TY first and ER last", () => {
    for (const line of lines) {
      expect(line, line).toMatch(/^[A-Z][A-Z0-9]  - /);
      expect(risTags.has(line.slice(0, 2)), line).toBe(true);
    }
    expect(lines[0].slice(0, 2)).toBe("TY");
    expect(risTypes.has(lines[0].slice(6))).toBe(true);
    expect(lines.at(-1)).toBe("ER  - ");
    expect(lines.filter((l) => l.startsWith("TY") || l.startsWith("ER"))).toHaveLength(2);
  });

  it("reads back with citation.js as a dataset with title, year, URL, edition and note", () => {
    const items = parse(ris);
    expect(items).toHaveLength(1);
    const item = items[0];
    expect(item.type).toBe("dataset");
    expect(item.id).toBe(citationKey(awkward.slug, awkward.edition));
    expect(item.title).toBe(awkwardTitle);
    expect(item.issued?.["date-parts"][0]).toEqual([2026, 6, 9]);
    expect(item.accessed?.["date-parts"][0]).toEqual([2026, 7, 1]);
    expect(item.URL).toBe(awkward.url);
    expect(String(item.version ?? item.edition)).toBe("3");
    expect(item.note).toContain(`Citation key ${citationKey(awkward.slug, awkward.edition)}.`);
    expect(item.publisher).toBe("Ergoshelf");
    expect(item.abstract).toBe(awkward.summary);
  });
});

// The parts of csl-data.json (citation-style-language/schema, schemas/input/csl-data.json)
// that our items touch: required id and type, the full type list, the name and date shapes,
// and no properties outside the schema's list.
const cslTypes = [
  "article", "article-journal", "article-magazine", "article-newspaper", "bill", "book", "broadcast", "chapter",
  "classic", "collection", "dataset", "document", "entry", "entry-dictionary", "entry-encyclopedia", "figure",
  "graphic", "hearing", "interview", "legal_case", "legislation", "manuscript", "map", "motion_picture",
  "musical_score", "pamphlet", "paper-conference", "patent", "performance", "periodical", "personal_communication",
  "post", "post-weblog", "regulation", "report", "review", "review-book", "software", "song", "speech", "standard",
  "thesis", "treaty", "webpage",
];
const dateVariable = {
  type: "object",
  properties: {
    "date-parts": {
      type: "array",
      items: { type: "array", items: { type: ["string", "number"] }, minItems: 1, maxItems: 3 },
      minItems: 1,
      maxItems: 2,
    },
    season: { type: ["string", "number"] },
    circa: { type: ["string", "number", "boolean"] },
    literal: { type: "string" },
    raw: { type: "string" },
  },
  additionalProperties: false,
};
const cslDataSchema = {
  type: "array",
  items: {
    type: "object",
    properties: {
      type: { type: "string", enum: cslTypes },
      id: { type: ["string", "number"] },
      title: { type: "string" },
      version: { type: "string" },
      author: {
        type: "array",
        items: {
          type: "object",
          properties: { family: { type: "string" }, given: { type: "string" }, literal: { type: "string" } },
          additionalProperties: false,
        },
      },
      publisher: { type: "string" },
      issued: dateVariable,
      accessed: dateVariable,
      URL: { type: "string" },
      abstract: { type: "string" },
      genre: { type: "string" },
      status: { type: "string" },
      note: { type: "string" },
    },
    required: ["type", "id"],
    additionalProperties: false,
  },
};

describe("CSL-JSON", () => {
  const validate = new Ajv({ allErrors: true, strict: true, allowUnionTypes: true }).compile(cslDataSchema);

  it("validates against the CSL data schema, also retracted and without an access date", () => {
    for (const input of [awkward, { ...plain, retracted: true, accessed: undefined }]) {
      const items = JSON.parse(JSON.stringify(toCSL(input)));
      expect(validate(items), JSON.stringify(validate.errors)).toBe(true);
    }
  });

  it("the schema check can fail: an unknown type or a malformed date is refused", () => {
    const [item] = toCSL(plain);
    expect(validate([{ ...item, type: "data-set" }])).toBe(false);
    expect(validate([{ ...item, issued: { "date-parts": [[2026, 6, 9, 1]] } }])).toBe(false);
    expect(validate([{ ...item, id: undefined }])).toBe(false);
  });

  it("reads back with citation.js unchanged in its fields", () => {
    const [item] = toCSL(awkward);
    const [back] = parse(JSON.stringify([item]));
    expect(back.id).toBe(item.id);
    expect(back.type).toBe("dataset");
    expect(back.title).toBe(awkwardTitle);
    expect(back.version).toBe("3");
    expect(back.URL).toBe(awkward.url);
    expect(back.issued).toEqual({ "date-parts": [[2026, 6, 9]] });
  });
});
