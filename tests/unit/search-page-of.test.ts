import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { pageOf, queryTerms } from "~/.server/search.server";

// The reference is Array.prototype.sort followed by slice (common practice, no source).
describe("pageOf", () => {
  const byScoreThenId = (a: { s: number; id: number }, b: { s: number; id: number }) => b.s - a.s || a.id - b.id;

  it("returns the same page as sorting everything and slicing, for any page", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 20 }), { maxLength: 400 }),
        fc.integer({ min: 0, max: 60 }),
        fc.integer({ min: 1, max: 30 }),
        (scores, start, size) => {
          const items = scores.map((s, id) => ({ s, id }));
          const expected = [...items].sort(byScoreThenId).slice(start, start + size);
          expect(pageOf([...items], byScoreThenId, start, start + size)).toEqual(expected);
        },
      ),
    );
  });

  it("uses the heap for a small first page of many items and still orders it", () => {
    const items = Array.from({ length: 1000 }, (_, id) => ({ s: (id * 7919) % 1000, id }));
    const page = pageOf([...items], byScoreThenId, 0, 25);
    expect(page.map((x) => x.s)).toEqual(Array.from({ length: 25 }, (_, i) => 999 - i));
  });

  it("returns nothing past the end or for an empty range", () => {
    expect(pageOf([{ s: 1, id: 0 }], byScoreThenId, 5, 10)).toEqual([]);
    expect(pageOf([{ s: 1, id: 0 }], byScoreThenId, 0, 0)).toEqual([]);
  });
});

describe("queryTerms", () => {
  it("splits on spaces and punctuation, lower-cases and drops stop words", () => {
    expect(queryTerms("Buoy-K07, the uplink!")).toEqual(["buoy", "k07", "uplink"]);
    expect(queryTerms("  of and the ")).toEqual([]);
  });
});
