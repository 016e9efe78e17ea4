/**
 * Library benchmark: `npm run bench:search` (run `npm run seed:synthetic -- 10000` first).
 *
 * 1. Search. Builds the search index over every model in the database, synthetic ones included,
 *    then runs typical queries (words, prefixes, typos, facet filters) many times each and prints,
 *    per query and pooled over the whole mix, the median and 95th percentile of searchLibrary's
 *    time end to end. "Uncached" clears the text-match cache before each run (words typed for the
 *    first time); "cached" repeats them (a facet click, a page turn).
 * 2. Model page. For every model of the seed catalogue, with the synthetic ones in the database
 *    beside them (they are not served: their pages answer 404 like an unknown slug), it times
 *    - the data: `loadModelPage` alone (the loader's data assembly);
 *    - the server render: the real route module (app/routes/library/model.tsx, its loader and its
 *      component) under a root route with the site header, footer and units provider, run through
 *      React Router's static handler and rendered with `renderToString`, hydration data included;
 *    - the full document, when a server build is at hand (BENCH_SERVER_BUILD, else
 *      build/server/index.js): a GET through the build's request handler in this process, so the
 *      real root loader, entry.server's streaming render and the turbo-stream payload are in it.
 *
 * Targets at 10,000 models: search p95 < 20 ms, a model page's server render p95 < 50 ms.
 * It prints figures; it does not fail. BENCH_RUNS sets the runs per case (default 60).
 */
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync, statSync } from "node:fs";
import { register } from "node:module";
import { resolve as resolvePath } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { sql } from "drizzle-orm";
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

// The server runs React's production build (react-router-serve sets NODE_ENV=production); the
// development build checks every element and is several times slower.
process.env.NODE_ENV ??= "production";

// Route modules import their stylesheet as `…css?url` (a Vite feature). Outside Vite, answer such
// imports with a placeholder address, so the real route module can be loaded and rendered here.
const cssStub = `export async function resolve(specifier, context, next) {
  if (/\\.css\\?url$/.test(specifier)) return { url: "data:text/javascript,export default '/assets/bench-placeholder.css'", shortCircuit: true };
  return next(specifier, context);
}`;
register(`data:text/javascript,${encodeURIComponent(cssStub)}`, import.meta.url);

// Loaded after the environment is set and the hook registered.
const { createElement } = await import("react");
const { renderToString } = await import("react-dom/server");
const { createRequestHandler, createStaticHandler, createStaticRouter, Outlet, StaticRouterProvider, useLoaderData } = await import("react-router");
const { closeDb, db } = await import("../app/.server/db.server");
const { getUser } = await import("../app/.server/auth.server");
const { loadModelPage } = await import("../app/.server/model-page.server");
const { clearSearchTextCache, rebuildSearchIndex, searchLibrary } = await import("../app/.server/search.server");
const { SiteFooter, SiteHeader } = await import("../app/components/site-shell");
const { ENGINE_VERSION } = await import("../app/engine/version");
const { UnitProvider, unitFromCookie } = await import("../app/units");
const modelRoute = await import("../app/routes/library/model");

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

/** Phrases typed one keystroke at a time: the box sends the query after every keystroke. */
const TYPED = ["buoy uplink burst", "sea state classes", "thermal drift", "mooring alarm winter", "relay mesh walk", "k07 frame errors"];

function quantile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil(p * sorted.length) - 1));
  return sorted[i];
}

interface Timing {
  median: number;
  p95: number;
  samples: number[];
}

function summarise(samples: number[]): Timing {
  const sorted = [...samples].sort((a, b) => a - b);
  return { median: quantile(sorted, 0.5), p95: quantile(sorted, 0.95), samples };
}

/** Times `run` (after one warm-up call) `runs` times; `before` runs untimed before each call. */
async function time(run: (i: number) => Promise<unknown>, runs: number, before?: () => void): Promise<Timing> {
  await run(-1);
  const samples: number[] = [];
  for (let i = 0; i < runs; i++) {
    before?.();
    const t = performance.now();
    await run(i);
    samples.push(performance.now() - t);
  }
  return summarise(samples);
}

const ms = (v: number) => v.toFixed(2).padStart(8);
const verdict = (v: number, target: number) => (v < target ? "met" : "NOT met");

// ---------------------------------------------------------------------------------------------
// The model page as the server renders it: the real route module under a stand-in root route.

/** The root route's part of a page: the real root loader's data and the shell around the outlet. */
async function rootLoader({ request }: { request: Request }) {
  const user = await getUser(request);
  return { user, engineVersion: ENGINE_VERSION, unit: unitFromCookie(request.headers.get("Cookie")) };
}

function Shell() {
  const root = useLoaderData() as Awaited<ReturnType<typeof rootLoader>>;
  const children = [
    createElement(SiteHeader, { key: "header", user: root.user }),
    createElement("main", { key: "main", id: "main" }, createElement(Outlet)),
    createElement(SiteFooter, { key: "footer", engineVersion: root.engineVersion }),
  ];
  return createElement(UnitProvider, { initial: root.unit, children });
}

function ModelRouteComponent() {
  const loaderData = useLoaderData();
  // The framework passes loaderData as a prop; the component uses nothing else.
  return createElement(modelRoute.default as (props: { loaderData: unknown }) => ReturnType<typeof createElement>, { loaderData });
}

const staticHandler = createStaticHandler([
  {
    id: "root",
    path: "/",
    loader: rootLoader,
    Component: Shell,
    children: [
      {
        id: "routes/library/model",
        path: "library/:slug",
        loader: modelRoute.loader as unknown as Parameters<typeof createStaticHandler>[0][number]["loader"],
        Component: ModelRouteComponent,
      },
    ],
  },
]);

const ORIGIN = "http://127.0.0.1:3000";

/** Runs the route loaders and renders the page to HTML; returns the HTML's length. */
async function renderModelPage(slug: string): Promise<number> {
  const context = await staticHandler.query(new Request(`${ORIGIN}/library/${encodeURIComponent(slug)}`));
  if (context instanceof Response) throw new Error(`/library/${slug} answered ${context.status}`);
  if (context.statusCode !== 200) throw new Error(`/library/${slug} answered ${context.statusCode}`);
  const router = createStaticRouter(staticHandler.dataRoutes, context);
  return renderToString(createElement(StaticRouterProvider, { router, context })).length;
}

/** The full-document handler of a server build, or null (with the reason) when there is none. */
async function documentHandler(): Promise<{ handle: (slug: string) => Promise<number>; label: string } | { reason: string }> {
  const path = resolvePath(root, process.env.BENCH_SERVER_BUILD ?? "build/server/index.js");
  if (!existsSync(path)) return { reason: `no server build at ${path} (npm run build, or set BENCH_SERVER_BUILD)` };
  const build = await import(pathToFileURL(path).href);
  const handler = createRequestHandler(build, "production");
  const built = statSync(path).mtime;
  return {
    label: `${path}, built ${built.toISOString().replace("T", " ").slice(0, 19)} UTC`,
    async handle(slug: string) {
      const response = await handler(new Request(`${ORIGIN}/library/${encodeURIComponent(slug)}`, { headers: { "User-Agent": "ergoshelf-bench" } }));
      const body = await response.text();
      if (response.status !== 200) throw new Error(`/library/${slug} answered ${response.status}`);
      return body.length;
    },
  };
}

// ---------------------------------------------------------------------------------------------

let exitCode = 0;
try {
  const counted = await db().execute(sql`select count(*)::int as all, count(*) filter (where is_synthetic)::int as synthetic from models`);
  const { all, synthetic } = counted.rows[0] as { all: number; synthetic: number };
  console.log(`Library benchmark: ${all} models in the database (${synthetic} synthetic), ${RUNS} runs per case.`);
  if (all < TARGET_MODELS) {
    console.log(`Fewer than ${TARGET_MODELS.toLocaleString("en")} models: run \`npm run seed:synthetic -- ${TARGET_MODELS}\` first for the figures the targets refer to.`);
  }

  // 1. Search --------------------------------------------------------------------------------
  const build = await rebuildSearchIndex({ includeSynthetic: true });
  console.log(`\nIndex build: ${build.documents} documents in ${build.ms.toFixed(0)} ms (loading from PostgreSQL included).\n`);
  console.log(`${"query".padEnd(38)} ${"matches".padStart(7)}  ${"uncached median / p95 ms".padStart(24)}  ${"cached median / p95 ms".padStart(22)}`);
  const pooledCold: number[] = [];
  const pooledWarm: number[] = [];
  let worstCold = { label: "", p95: 0 };
  let worstWarm = { label: "", p95: 0 };
  for (const { label, query } of QUERIES) {
    const result = await searchLibrary(query, { includeSynthetic: true });
    const cold = await time(() => searchLibrary(query, { includeSynthetic: true }), RUNS, clearSearchTextCache);
    const warm = await time(() => searchLibrary(query, { includeSynthetic: true }), RUNS);
    pooledCold.push(...cold.samples);
    pooledWarm.push(...warm.samples);
    if (cold.p95 > worstCold.p95) worstCold = { label, p95: cold.p95 };
    if (warm.p95 > worstWarm.p95) worstWarm = { label, p95: warm.p95 };
    console.log(`${label.padEnd(38)} ${String(result.total).padStart(7)}  ${ms(cold.median)} / ${ms(cold.p95)}     ${ms(warm.median)} / ${ms(warm.p95)}`);
  }
  // Typing: caches cleared once per phrase, then every keystroke's query in turn (as the page
  // sends them); words already typed are reused, the word being typed is new at each keystroke.
  const typing: number[] = [];
  const passes = Math.max(1, Math.round(RUNS / 10));
  for (let pass = 0; pass < passes; pass++) {
    for (const phrase of TYPED) {
      clearSearchTextCache();
      for (let i = 1; i <= phrase.length; i++) {
        const t = performance.now();
        await searchLibrary({ q: phrase.slice(0, i) }, { includeSynthetic: true });
        typing.push(performance.now() - t);
      }
    }
  }
  const typed = summarise(typing);
  console.log(`${`typing ${TYPED.length} phrases, per keystroke`.padEnd(38)} ${"".padStart(7)}  ${ms(typed.median)} / ${ms(typed.p95)}     (${typing.length} keystrokes)`);
  const mixCold = summarise(pooledCold);
  const mixWarm = summarise(pooledWarm);
  console.log(`${"all queries pooled".padEnd(38)} ${"".padStart(7)}  ${ms(mixCold.median)} / ${ms(mixCold.p95)}     ${ms(mixWarm.median)} / ${ms(mixWarm.p95)}`);
  console.log(
    `\nSearch p95 over the query mix (target < ${SEARCH_TARGET_MS} ms): uncached ${mixCold.p95.toFixed(2)} ms (${verdict(mixCold.p95, SEARCH_TARGET_MS)}), cached ${mixWarm.p95.toFixed(2)} ms (${verdict(mixWarm.p95, SEARCH_TARGET_MS)})`,
  );
  console.log(`Search p95 per keystroke while typing (target < ${SEARCH_TARGET_MS} ms): ${typed.p95.toFixed(2)} ms (${verdict(typed.p95, SEARCH_TARGET_MS)})`);
  console.log(
    `Search p95 of the slowest single query: uncached ${worstCold.p95.toFixed(2)} ms (${worstCold.label}; ${verdict(worstCold.p95, SEARCH_TARGET_MS)}), cached ${worstWarm.p95.toFixed(2)} ms (${worstWarm.label}; ${verdict(worstWarm.p95, SEARCH_TARGET_MS)})`,
  );

  // 2. Model pages ---------------------------------------------------------------------------
  const catalogue = (
    (await db().execute(sql`select m.slug, max(length(e.params::text)) as size, count(*)::int as editions
      from models m join editions e on e.model_id = m.id where not m.is_synthetic group by m.slug order by m.slug`)).rows as { slug: string; size: number; editions: number }[]
  );
  const heaviest = [...catalogue].sort((a, b) => Number(b.size) - Number(a.size))[0];
  const groups: { label: string; slugs: string[]; runs: number }[] = [
    { label: `catalogue, all ${catalogue.length} models in turn`, slugs: catalogue.map((r) => r.slug), runs: RUNS * 3 },
  ];
  if (heaviest) {
    groups.push({ label: `largest parameters: ${heaviest.slug} (${heaviest.editions} ed.)`, slugs: [heaviest.slug], runs: RUNS });
  }
  const documents = await documentHandler();
  console.log(`\nModel page (/library/<slug>), median / p95 ms:`);
  console.log(
    `  data: loadModelPage alone; render: route loaders + renderToString of the route component with hydration data;`,
  );
  console.log(
    "reason" in documents
      ? `  document: not measured, ${documents.reason}.`
      : `  document: GET through the server build's request handler (${documents.label}).`,
  );
  console.log(`\n${"pages".padEnd(52)} ${"data".padStart(17)}  ${"render".padStart(17)}  ${"document".padStart(17)}  ${"HTML kB".padStart(8)}`);
  let worstRender = 0;
  let worstDocument = 0;
  for (const g of groups) {
    const pick = (i: number) => g.slugs[(i + g.slugs.length) % g.slugs.length];
    const dataTiming = await time((i) => loadModelPage({ slug: pick(i), url: `${ORIGIN}/library/${pick(i)}` }), g.runs);
    let bytes = 0;
    const render = await time(async (i) => (bytes = Math.max(bytes, await renderModelPage(pick(i)))), g.runs);
    const doc = "reason" in documents ? null : await time((i) => documents.handle(pick(i)), g.runs);
    worstRender = Math.max(worstRender, render.p95);
    if (doc) worstDocument = Math.max(worstDocument, doc.p95);
    const pair = (t: Timing | null) => (t ? `${ms(t.median)} /${ms(t.p95)}` : "—".padStart(17));
    console.log(`${g.label.padEnd(52)} ${pair(dataTiming)}  ${pair(render)}  ${pair(doc)}  ${(bytes / 1024).toFixed(0).padStart(8)}`);
  }
  console.log(`\nModel page server render p95, slowest group (target < ${PAGE_TARGET_MS} ms): render ${worstRender.toFixed(2)} ms (${verdict(worstRender, PAGE_TARGET_MS)})` +
    ("reason" in documents ? "" : `, full document ${worstDocument.toFixed(2)} ms (${verdict(worstDocument, PAGE_TARGET_MS)})`));
} catch (error) {
  console.error("[bench:search] failed:", error);
  exitCode = 1;
} finally {
  await closeDb();
}
// A server build brings its own database pool; end the process rather than wait for it.
process.exit(exitCode);
