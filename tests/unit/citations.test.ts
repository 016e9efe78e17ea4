// Citation text in BibTeX, RIS and CSL-JSON, and the HTTP answer the citation routes give.
import { describe, expect, it } from "vitest";
import {
  answerCitation,
  bibtexKey,
  bodyETag,
  citationKey,
  citationNote,
  escapeTeX,
  etagMatches,
  renderCitation,
  toBibTeX,
  toCSL,
  toRIS,
  type CitationInput,
  type CitationLookup,
  type EditionForCitation,
} from "~/citations";

const base: CitationInput = {
  slug: "buoy-k05-sea-state-hourly",
  title: "Buoy K05 sea state, hourly classes",
  edition: 2,
  family: "markov",
  summary: "Hourly sea-state class at buoy K05 in Kelpmoor Sound.",
  publishedAt: new Date("2026-03-14T12:00:00Z"),
  contentHash: "9f2c".repeat(16),
  engineVersion: "1.4.0",
  entropyRateBits: 0.8123456789123,
  url: "https://ergoshelf.example/library/buoy-k05-sea-state-hourly/e/2",
};

describe("citation keys", () => {
  it("uses ergoshelf:<slug>@<edition> as the citation key", () => {
    expect(citationKey("ro-bits-order3", 3)).toBe("ergoshelf:ro-bits-order3@3");
  });
  it("uses a BibTeX key without @, distinct for slugs that end in -e<digits>", () => {
    expect(bibtexKey("ro-bits-order3", 3)).toBe("ergoshelf:ro-bits-order3-e3");
    expect(bibtexKey("tide-e1", 2)).not.toBe(bibtexKey("tide", 12));
    expect(bibtexKey("a", 1)).not.toContain("@");
  });
});

describe("escapeTeX", () => {
  it("escapes each TeX special character", () => {
    expect(escapeTeX("a & b % c $ d # e _ f")).toBe("a \\& b \\% c \\$ d \\# e \\_ f");
    expect(escapeTeX("x~y^z\\w")).toBe("x\\textasciitilde{}y\\textasciicircum{}z\\textbackslash{}w");
  });
  it("keeps braces balanced by writing them as text commands", () => {
    const out = escapeTeX("{unbalanced");
    expect(out).toBe("\\textbraceleft{}unbalanced");
    const depth = [...out].reduce((d, ch) => d + (ch === "{" ? 1 : ch === "}" ? -1 : 0), 0);
    expect(depth).toBe(0);
  });
  it("keeps non-ASCII characters as they are and folds line breaks", () => {
    expect(escapeTeX("Kelpmoor Sund — Ærø\nnorth")).toBe("Kelpmoor Sund — Ærø north");
  });
});

describe("citationNote", () => {
  it("names the key, the rate with its unit, the hash and the engine version", () => {
    const note = citationNote(base);
    expect(note).toContain("ergoshelf:buoy-k05-sea-state-hourly@2");
    expect(note).toContain("0.8123456789 bits/symbol");
    expect(note).toContain(base.contentHash);
    expect(note).toContain("1.4.0");
    expect(note).toContain("Markov chain");
    expect(note).not.toContain("retracted");
  });
  it("says when there is no single rate instead of printing null or NaN", () => {
    const note = citationNote({ ...base, entropyRateBits: null });
    expect(note).toMatch(/no single rate/);
    expect(note).not.toMatch(/null|NaN/);
  });
  it("keeps small rates readable (no rounding to zero)", () => {
    expect(citationNote({ ...base, entropyRateBits: 2.0345e-5 })).toContain("0.000020345 bits/symbol");
  });
  it("marks a retracted edition", () => {
    expect(citationNote({ ...base, retracted: true })).toMatch(/retracted/);
  });
});

describe("toBibTeX", () => {
  const bib = toBibTeX({ ...base, title: "Tide gauge 5% & $ cost_{x}", accessed: "2026-05-02" });
  it("writes one @misc entry with the BibTeX key", () => {
    expect(bib.startsWith("@misc{ergoshelf:buoy-k05-sea-state-hourly-e2,\n")).toBe(true);
    expect(bib.trimEnd().endsWith("}")).toBe(true);
  });
  it("escapes the title and carries the edition in it", () => {
    expect(bib).toContain("title        = {{Tide gauge 5\\% \\& \\$ cost\\_\\textbraceleft{}x\\textbraceright{}}, edition 2}");
  });
  it("has the fields a reader needs: author, URL, year, month macro, version, access date, note", () => {
    expect(bib).toMatch(/author\s+= \{\{Ergoshelf library\}\}/);
    expect(bib).toContain("howpublished = {\\url{https://ergoshelf.example/library/buoy-k05-sea-state-hourly/e/2}}");
    expect(bib).toMatch(/year\s+= \{2026\}/);
    expect(bib).toMatch(/month\s+= mar,/);
    expect(bib).toMatch(/version\s+= \{2\}/);
    expect(bib).toMatch(/urldate\s+= \{2026-05-02\}/);
    expect(bib).toMatch(/note\s+= \{Citation key ergoshelf:buoy-k05-sea-state-hourly@2\./);
  });
  it("has balanced braces over the whole entry", () => {
    const depth = [...bib].reduce((d, ch) => d + (ch === "{" ? 1 : ch === "}" ? -1 : 0), 0);
    expect(depth).toBe(0);
  });
  it("escapes % and # in the \\url argument", () => {
    expect(toBibTeX({ ...base, url: "https://h.example/a%20b#x" })).toContain("\\url{https://h.example/a\\%20b\\#x}");
  });
  it("leaves out urldate when no access date is given", () => {
    expect(toBibTeX(base)).not.toContain("urldate");
  });
  it("refuses an unreadable date rather than writing NaN", () => {
    expect(() => toBibTeX({ ...base, publishedAt: "not a date" })).toThrow(/publishedAt is not a valid date/);
  });
});

describe("toRIS", () => {
  const ris = toRIS({ ...base, title: "Line one\nline two", accessed: new Date("2026-05-02T08:00:00Z") });
  const lines = ris.split("\r\n");
  it("ends every line with CRLF and has no bare LF", () => {
    expect(ris.endsWith("\r\n")).toBe(true);
    expect(ris.replace(/\r\n/g, "")).not.toMatch(/[\r\n]/);
  });
  it("starts with TY  - DATA and ends with ER", () => {
    expect(lines[0]).toBe("TY  - DATA");
    expect(lines.at(-2)).toBe("ER  - ");
  });
  it("has the edition, dates, URL and key", () => {
    expect(lines).toContain("ET  - 2");
    expect(lines).toContain("PY  - 2026");
    expect(lines).toContain("DA  - 2026/03/14/");
    expect(lines).toContain("Y2  - 2026/05/02/");
    expect(lines).toContain(`UR  - ${base.url}`);
    expect(lines).toContain("ID  - ergoshelf:buoy-k05-sea-state-hourly@2");
    expect(lines).toContain("TI  - Line one line two");
  });
});

describe("toCSL", () => {
  it("gives one dataset item keyed by the citation key", () => {
    const [item, ...rest] = toCSL({ ...base, publishedAt: "2026-03-14", accessed: "2026-05-02" });
    expect(rest).toEqual([]);
    expect(item.id).toBe("ergoshelf:buoy-k05-sea-state-hourly@2");
    expect(item.type).toBe("dataset");
    expect(item.version).toBe("2");
    expect(item.issued).toEqual({ "date-parts": [[2026, 3, 14]] });
    expect(item.accessed).toEqual({ "date-parts": [[2026, 5, 2]] });
    expect(item.URL).toBe(base.url);
    expect(item.publisher).toBe("Ergoshelf");
    expect(item.status).toBeUndefined();
  });
  it("marks a retracted edition with status", () => {
    expect(toCSL({ ...base, retracted: true })[0].status).toBe("retracted");
  });
  it("renders as JSON that parses back to the same items", () => {
    expect(JSON.parse(renderCitation("csl", base))).toEqual(toCSL(base));
  });
});

describe("ETag", () => {
  it("changes when the text changes and is stable otherwise", () => {
    const a = bodyETag(renderCitation("bibtex", base));
    expect(bodyETag(renderCitation("bibtex", base))).toBe(a);
    expect(bodyETag(renderCitation("bibtex", { ...base, retracted: true }))).not.toBe(a);
    expect(a).toMatch(/^"[0-9a-f]{16}"$/);
  });
  it("matches If-None-Match lists, weak tags and *", () => {
    expect(etagMatches('"x", "abc"', '"abc"')).toBe(true);
    expect(etagMatches('W/"abc"', '"abc"')).toBe(true);
    expect(etagMatches("*", '"abc"')).toBe(true);
    expect(etagMatches('"abd"', '"abc"')).toBe(false);
    expect(etagMatches(null, '"abc"')).toBe(false);
  });
});

describe("answerCitation", () => {
  const stored: EditionForCitation = {
    model: { slug: base.slug, title: base.title, family: "markov", summary: base.summary },
    number: 2,
    publishedAt: new Date("2026-03-14T12:00:00Z"),
    retractedAt: null,
    contentHash: base.contentHash,
    engineVersion: "1.4.0",
    entropyRateBits: 0.81,
  };
  const lookup: CitationLookup = {
    edition: async (slug, n) => (slug === base.slug && n === 2 ? stored : null),
    editionNumbers: async (slug) => (slug === base.slug ? [1, 2] : null),
  };
  const req = (path: string, headers: HeadersInit = {}) => new Request(`http://127.0.0.1:5312${path}`, { headers });

  it("answers the file with its type, disposition, cache headers and the URL on the request's origin", async () => {
    const res = await answerCitation(req("/x"), { slug: base.slug, edition: "2" }, "ris", lookup);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/x-research-info-systems; charset=utf-8");
    expect(res.headers.get("content-disposition")).toBe('attachment; filename="ergoshelf-buoy-k05-sea-state-hourly-e2.ris"');
    expect(res.headers.get("cache-control")).toMatch(/max-age=\d+/);
    const text = await res.text();
    expect(text).toContain("UR  - http://127.0.0.1:5312/library/buoy-k05-sea-state-hourly/e/2\r\n");
    expect(res.headers.get("etag")).toBe(bodyETag(text));
  });
  it("answers 304 without a body when the ETag matches", async () => {
    const first = await answerCitation(req("/x"), { slug: base.slug, edition: "2" }, "bibtex", lookup);
    const etag = first.headers.get("etag")!;
    const again = await answerCitation(req("/x", { "If-None-Match": etag }), { slug: base.slug, edition: "2" }, "bibtex", lookup);
    expect(again.status).toBe(304);
    expect(again.headers.get("etag")).toBe(etag);
    expect(await again.text()).toBe("");
  });
  it("answers 400 for an edition that is not a whole number from 1", async () => {
    for (const edition of ["two", "1.5", "0", "-1", "2e1"]) {
      const res = await answerCitation(req("/x"), { slug: base.slug, edition }, "csl", lookup);
      expect(res.status, edition).toBe(400);
      expect(res.headers.get("content-type")).toMatch(/^text\/plain/);
      expect(await res.text()).toMatch(/whole number/);
    }
  });
  it("answers 400 for an access date that is not YYYY-MM-DD", async () => {
    const res = await answerCitation(req("/x?accessed=yesterday"), { slug: base.slug, edition: "2" }, "csl", lookup);
    expect(res.status).toBe(400);
    expect(await res.text()).toMatch(/YYYY-MM-DD/);
  });
  it("puts a valid access date into the file", async () => {
    const res = await answerCitation(req("/x?accessed=2026-05-02"), { slug: base.slug, edition: "2" }, "csl", lookup);
    expect((await res.json())[0].accessed).toEqual({ "date-parts": [[2026, 5, 2]] });
  });
  it("answers 404 naming an unknown model or an unknown edition", async () => {
    const noModel = await answerCitation(req("/x"), { slug: "no-such-model", edition: "1" }, "bibtex", lookup);
    expect(noModel.status).toBe(404);
    expect(await noModel.text()).toMatch(/no model "no-such-model"/);
    const noEdition = await answerCitation(req("/x"), { slug: base.slug, edition: "7" }, "bibtex", lookup);
    expect(noEdition.status).toBe(404);
    expect(await noEdition.text()).toMatch(/no edition 7; it has editions 1, 2/);
  });
});
