import { describe, expect, it } from "vitest";
import { formatRange, parseRange, parseSearchParams, toSearchParams } from "~/search-params";

const parse = (qs: string) => parseSearchParams(new URLSearchParams(qs));

describe("parseRange", () => {
  it("reads a single count, closed and open ranges, and an en dash", () => {
    expect(parseRange("2", true)).toEqual({ min: 2, max: 2 });
    expect(parseRange("3-4", true)).toEqual({ min: 3, max: 4 });
    expect(parseRange("17-", true)).toEqual({ min: 17 });
    expect(parseRange("-8", true)).toEqual({ max: 8 });
    expect(parseRange("0.5–0.9", false)).toEqual({ min: 0.5, max: 0.9 });
  });
  it("refuses reversed ranges, fractions where counts are asked, and junk", () => {
    expect(parseRange("4-3", true)).toBeNull();
    expect(parseRange("2.5", true)).toBeNull();
    expect(parseRange("abc", false)).toBeNull();
    expect(parseRange("-", false)).toBeNull();
    expect(parseRange("1-2-3", false)).toBeNull();
  });
  it("round-trips through formatRange", () => {
    for (const [min, max] of [[2, 2], [3, 4], [17, undefined], [undefined, 8]] as const) {
      expect(parseRange(formatRange(min, max), true)).toEqual({ ...(min !== undefined ? { min } : {}), ...(max !== undefined ? { max } : {}) });
    }
  });
});

describe("parseSearchParams", () => {
  it("turns a full URL query into a search query", () => {
    const r = parse("q=+ring+oscillator+&family=markov&family=hidden&states=3-4&rate=0.9-&minEntropy=yes&tag=telemetry&tag=link&sort=rate&dir=asc&page=2&pageSize=50");
    expect(r).toEqual({
      ok: true,
      value: {
        q: "ring oscillator",
        family: ["markov", "hidden"],
        statesMin: 3,
        statesMax: 4,
        rateMin: 0.9,
        hasMinEntropy: true,
        tags: ["telemetry", "link"],
        sort: "rate",
        dir: "asc",
        page: 2,
        pageSize: 50,
      },
    });
  });
  it("gives an empty query for no parameters and ignores unknown ones", () => {
    expect(parse("utm=x")).toEqual({ ok: true, value: { q: "" } });
  });
  it("reads minEntropy=no as a filter for models without a min-entropy rate", () => {
    expect(parse("minEntropy=no")).toMatchObject({ ok: true, value: { hasMinEntropy: false } });
  });
  it("names every bad parameter with a message", () => {
    const r = parse("family=markoff&states=0&rate=x&sort=best&dir=up&page=0&pageSize=500");
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.issues.map((i) => i.path).sort()).toEqual(["dir", "family", "page", "pageSize", "rate", "sort", "states"]);
    expect(r.error.message).toMatch(/family/);
    for (const issue of r.error.issues) expect(issue.message.length).toBeGreaterThan(5);
  });
  it("refuses over-long query text", () => {
    expect(parse(`q=${"a".repeat(201)}`).ok).toBe(false);
  });
});

describe("toSearchParams", () => {
  it("writes back what parseSearchParams reads, leaving defaults out", () => {
    const query = { q: "tide", family: ["markov" as const], statesMin: 5, statesMax: 8, rateMax: 1.5, hasMinEntropy: false, tags: ["sea state"], sort: "title" as const, page: 3 };
    const qs = toSearchParams(query);
    expect(qs.has("dir")).toBe(false); // title sorts ascending by default
    expect(parseSearchParams(qs)).toEqual({ ok: true, value: query });
    expect(toSearchParams({ q: "", sort: "relevance", dir: "desc", page: 1 }).toString()).toBe("");
  });
});
