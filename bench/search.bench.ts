/**
 * Search benchmark: `npm run bench:search` (run `npm run seed:synthetic -- 10000` first).
 *
 * Builds the search index over every model in the database, synthetic ones included, then runs
 * typical queries (words, prefixes, typos, facet filters) many times each and prints the median
 * and 95th percentile of searchLibrary's time end to end, and of a model page's data loading
 * (getModelWithEditions + getEdition). Targets at 10,000 models: search p95 < 20 ms, model page
 * data p95 < 50 ms. It prints figures; it does not fail.
 */
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { sql } from "drizzle-orm";
import { closeDb, db } from "../app/.server/db.server";
import { getEdition, getModelWithEditions } from "../app/.server/library.server";
import { clearSearchTextCache, rebuildSearchIndex, searchLibrary } from "../app/.server/search.server";
import type { SearchQuery } from "../app/search-params";

const TARGET_MODELS = 10_000;
const SEARCH_TARGET_MS = 20;
const PAGE_TARGET_MS = 50;
const RUNS = Number(process.env.BENCH_RUNS ?? 60);

const root = fileURLToPath(new URL("..", import.meta.url));
if (!process.env.DATABASE_URL) {
  process.env.DATABASE_URL = execFileSync("bash", ["scripts/db.sh", "url", "main"], { cwd: root, encoding: "utf8" }).trim();
}
if (!process.env.SESSION_SECRET) {
  const file = `${root}.data/session-secret`;
  process.env.SESSION_SECRET = existsSync(file) ? readFileSync(file, "utf8").trim() : "bench-search-does-not-sign-cookies";
}

const QUERIES: { label: string; query: SearchQuery }[] = [
  { label: "word: ring", query: { q: "ring" } },
  { label: "word: uplink", query: { q: "uplink" } },
  { label: "two words: sea state", query: { q: "sea state" } },
  { label: "three words: buoy uplink burst", query: { q: "buoy uplink burst" } },
  { label: "prefix: oscil", query: { q: "oscil" } },
  { label: "prefix: mo", query: { q: "mo" } },
  { label: "prefix: k0", query: { q: "k0" } },
  { label: "typo: oscilator", query: { q: "oscilator" } },
  { label: "typo: bilgee pmup", query: { q: "bilgee pmup" } },
  { label: "typo: thermla drfit", query: { q: "thermla drfit" } },
  { label: "name: swell", query: { q: "swell" } },
  { label: "no text, default order", query: { q: "" } },
  { label: "no text, sort by title", query: { q: "", sort: "title" } },
  { label: "family: graph-walk", query: { q: "", family: ["graph-walk"] } },
  { label: "family + word: markov tide", query: { q: "tide", family: ["markov"] } },
  { label: "states 5-8", query: { q: "", statesMin: 5, statesMax: 8 } },
  { label: "rate 0.9-1.0, sort rate", query: { q: "", rateMin: 0.9, rateMax: 1, sort: "rate" } },
  { label: "has min-entropy + word", query: { q: "entropy source", hasMinEntropy: true } },
  { label: "tag: telemetry, page 3", query: { q: "", tags: ["telemetry"], page: 3 } },
  { label: "everything at once", query: { q: "buoy", family: ["markov", "two-state"], statesMin: 2, statesMax: 6, rateMin: 0.2, tags: ["synthetic"] } },
];

function quantile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil(p * sorted.length) - 1));
  return sorted[i];
}

async function time(run: () => Promise<unknown>, runs: number, before?: () => void): Promise<{ median: number; p95: number }> {
  await run(); // warm
  const samples: number[] = [];
  for (let i = 0; i < runs; i++) {
    before?.();
    const t = performance.now();
    await run();
    samples.push(performance.now() - t);
  }
  samples.sort((a, b) => a - b);
  return { median: quantile(samples, 0.5), p95: quantile(samples, 0.95) };
}

const ms = (v: number) => v.toFixed(2).padStart(8);

try {
  const counted = await db().execute(sql`select count(*)::int as all, count(*) filter (where is_synthetic)::int as synthetic from models`);
  const { all, synthetic } = counted.rows[0] as { all: number; synthetic: number };
  console.log(`Search benchmark: ${all} models in the database (${synthetic} synthetic), ${RUNS} runs per case.`);
  if (all < TARGET_MODELS) {
    console.log(`Fewer than ${TARGET_MODELS.toLocaleString("en")} models: run \`npm run seed:synthetic -- ${TARGET_MODELS}\` first for the figures the targets refer to.`);
  }

  const build = await rebuildSearchIndex({ includeSynthetic: true });
  console.log(`Index build: ${build.documents} documents in ${build.ms.toFixed(0)} ms (loading from PostgreSQL included).\n`);

  // "uncached": the text-match cache is cleared before each run (a query typed for the first
  // time); "cached": the same words again, as when a facet is clicked or a page turned.
  console.log(`${"query".padEnd(38)} ${"matches".padStart(7)}  ${"uncached median / p95 ms".padStart(24)}  ${"cached median / p95 ms".padStart(22)}`);
  let worstCold = 0;
  let worstWarm = 0;
  for (const { label, query } of QUERIES) {
    const result = await searchLibrary(query, { includeSynthetic: true });
    const cold = await time(() => searchLibrary(query, { includeSynthetic: true }), RUNS, clearSearchTextCache);
    const warm = await time(() => searchLibrary(query, { includeSynthetic: true }), RUNS);
    worstCold = Math.max(worstCold, cold.p95);
    worstWarm = Math.max(worstWarm, warm.p95);
    console.log(`${label.padEnd(38)} ${String(result.total).padStart(7)}  ${ms(cold.median)} / ${ms(cold.p95)}     ${ms(warm.median)} / ${ms(warm.p95)}`);
  }
  const verdict = (v: number) => (v < SEARCH_TARGET_MS ? "met" : "NOT met");
  console.log(`\nSearch p95, worst query (target < ${SEARCH_TARGET_MS} ms): uncached ${worstCold.toFixed(2)} ms (${verdict(worstCold)}), cached ${worstWarm.toFixed(2)} ms (${verdict(worstWarm)})`);

  // A model page: the model with its edition list, then its latest edition, for a spread of models.
  const picked = await db().execute(sql`select slug from models order by md5(slug) limit 50`);
  const slugs = (picked.rows as { slug: string }[]).map((r) => r.slug);
  let k = 0;
  const page = await time(async () => {
    const slug = slugs[k++ % slugs.length];
    const found = await getModelWithEditions(slug);
    if (found) await getEdition(slug, found.editions[found.editions.length - 1].number);
  }, RUNS * 3);
  console.log(
    `Model page data (getModelWithEditions + getEdition): median ${page.median.toFixed(2)} ms, p95 ${page.p95.toFixed(2)} ms` +
      ` (target < ${PAGE_TARGET_MS} ms): ${page.p95 < PAGE_TARGET_MS ? "met" : "NOT met"}`,
  );
} finally {
  await closeDb();
}
