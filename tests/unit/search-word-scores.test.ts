// The library search scores each query word itself (scoreWord), reading minisearch's vocabulary
// and postings, instead of calling minisearch's search per word (which builds a result object per
// matching model). The scores must be minisearch's own: checked here against minisearch 7's
// search for every word of the catalogue (catalog/*.json) and for prefixes and typos of them.
// A minisearch upgrade that changes its scoring or its index layout fails here.
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { adjacentTranspositions, createSearchIndex, queryTerms, scoreWord, searchIndex, type IndexedModel } from "~/.server/search.server";

interface CatalogFile {
  slug: string;
  title: string;
  family: string;
  summary: string;
  tags: string[];
  editions: { params: Record<string, unknown> }[];
}

const dir = join(process.cwd(), "catalog");
const files: CatalogFile[] = readdirSync(dir)
  .filter((f) => f.endsWith(".json"))
  .sort()
  .map((f) => JSON.parse(readFileSync(join(dir, f), "utf8")))
  .filter((m) => Array.isArray(m.editions)); // the committed JSON Schema sits beside the models

/** The names a model's parameters give its symbols, states or nodes (enough for this check). */
function namesOf(params: Record<string, unknown>): string {
  const out: string[] = [];
  for (const key of ["alphabet", "states", "nodes", "hiddenStates", "outputs"]) {
    const v = params[key];
    if (Array.isArray(v)) out.push(...v.map(String));
  }
  return out.join(" ");
}

const models: IndexedModel[] = files.map((f, i) => ({
  slug: f.slug,
  title: f.title,
  family: f.family,
  summary: f.summary,
  tags: f.tags,
  latestEdition: f.editions.length,
  states: null,
  entropyRateBits: null,
  minEntropyRateBits: null,
  updatedAt: new Date(Date.UTC(2026, 0, 1 + i)),
  names: namesOf(f.editions[f.editions.length - 1].params),
}));
const index = createSearchIndex(models);

/** minisearch's own ranking of one word, as (slug → score). */
function minisearchScores(term: string): Map<string, number> {
  return new Map(index.mini.search(term).map((h) => [index.all[h.id as number].slug, h.score]));
}
function ourScores(term: string, transpositions: boolean): Map<string, number> {
  const hits = scoreWord(index, term, { transpositions });
  return new Map(Array.from(hits.ids, (id, i) => [index.all[id].slug, hits.scores[i]]));
}
/** Whether the search would take `term` as it is (not a stop word, already in its indexed form). */
const kept = (term: string) => queryTerms(term).join(" ") === term;
function expectSame(term: string) {
  const theirs = minisearchScores(term);
  const ours = ourScores(term, false);
  expect([...ours.keys()].sort(), term).toEqual([...theirs.keys()].sort());
  for (const [slug, score] of theirs) expect(Math.abs(ours.get(slug)! - score), `${term} / ${slug}`).toBeLessThanOrEqual(1e-9 * Math.max(1, score));
}

const vocabulary = [...new Set(files.flatMap((f) => queryTerms(`${f.title} ${f.summary} ${f.tags.join(" ")} ${f.family}`)))].sort();

describe("scoreWord", () => {
  it("has a vocabulary worth checking", () => {
    expect(files.length).toBeGreaterThanOrEqual(30);
    expect(vocabulary.length).toBeGreaterThan(300);
  });

  it("gives minisearch's scores for every word of the catalogue", () => {
    for (const term of vocabulary) expectSame(term);
  });

  it("gives minisearch's scores for prefixes and one-letter typos of catalogue words", () => {
    const variants = vocabulary.filter((w) => w.length >= 5).flatMap((w) => [w.slice(0, 3), w.slice(0, -1), `${w.slice(0, 2)}x${w.slice(3)}`]);
    const checked = [...new Set(variants)].filter(kept);
    expect(checked.length).toBeGreaterThan(500);
    for (const term of checked) expectSame(term);
  });

  it("leaves the scratch buffers clean, so one word's scores do not leak into the next", () => {
    const first = ourScores("buoy", false);
    ourScores("oscillator", false);
    expect(ourScores("buoy", false)).toEqual(first);
    expect(index.scratch.sum.every((x) => x === 0)).toBe(true);
    expect(index.scratch.mark.every((x) => x === 0)).toBe(true);
  });
});

describe("transposed letters", () => {
  it("lists each adjacent swap once, without the word itself", () => {
    expect(adjacentTranspositions("bouy").sort()).toEqual(["boyu", "buoy", "obuy"]);
    expect(adjacentTranspositions("aab").sort()).toEqual(["aba"]);
  });

  it("finds a model from a word with two letters swapped, which minisearch's typo allowance misses", () => {
    // A swap is two edits (Levenshtein); a 6-letter word is allowed round(0.2 × 6) = 1, so
    // minisearch alone finds nothing for a 6-letter catalogue word with its 2nd and 3rd letters swapped.
    const target = vocabulary.find((w) => w.length === 6 && w[1] !== w[2] && minisearchScores(w).size > 0 && minisearchScores(w[0] + w[2] + w[1] + w.slice(3)).size === 0);
    expect(target, "a 6-letter catalogue word whose swap minisearch cannot find").toBeTruthy();
    const swapped = target![0] + target![2] + target![1] + target!.slice(3);
    const found = ourScores(swapped, true);
    const exact = minisearchScores(target!);
    for (const slug of exact.keys()) expect(found.has(slug), `${swapped} → ${slug}`).toBe(true);
    // Weighted as a one-edit typo: below the exact word's score.
    for (const [slug, score] of found) if (exact.has(slug)) expect(score).toBeLessThan(exact.get(slug)!);
  });

  it("does not apply to words of three letters", () => {
    expect(ourScores("rae", true)).toEqual(ourScores("rae", false));
  });

  it("reaches the library search itself", () => {
    const slug = "modem-line-state-optocoupler";
    expect(searchIndex(index, { q: "optocoupelr" }).rows[0]?.slug).toBe(slug);
  });
});
