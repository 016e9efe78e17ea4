import { useEffect, useRef, useState } from "react";
import { data, Form } from "react-router";
import { ResultsTable, type ResultRow, type SortKey } from "~/components/library/results-table";
import { familyLabels } from "~/families";
import { defaultDirection, parseSearchParams, STATE_RANGES, type SearchQuery } from "~/search-params";
import { searchLibrary } from "~/.server/search.server";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Library · Ergoshelf" }];

interface Facet {
  value: string;
  count: number;
}
interface SearchResult {
  total: number;
  page: number;
  pageSize: number;
  rows: ResultRow[];
  facets: { family: Facet[]; tags: Facet[]; states: { min: number | null; max: number | null }; rate: { min: number | null; max: number | null } };
}

function serialise(result: Awaited<ReturnType<typeof searchLibrary>>): SearchResult {
  return JSON.parse(JSON.stringify(result)) as SearchResult;
}

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const parsed = parseSearchParams(url.searchParams);
  if (!parsed.ok) {
    const result = serialise(await searchLibrary({ q: "" }));
    return data({ query: { q: "" } as SearchQuery, result, error: parsed.error.message, search: "" }, { status: 400 });
  }
  return { query: parsed.value, result: serialise(await searchLibrary(parsed.value)), error: null as string | null, search: url.search };
}

/** The URL of a result page for a parsed query (links work without JavaScript). */
function pageHref(q: SearchQuery, page: number): string {
  const p = new URLSearchParams();
  if (q.q) p.set("q", q.q);
  for (const f of q.family ?? []) p.append("family", f);
  if (q.statesMin !== undefined || q.statesMax !== undefined) p.set("states", q.statesMin === q.statesMax ? String(q.statesMin) : `${q.statesMin ?? ""}-${q.statesMax ?? ""}`);
  if (q.rateMin !== undefined || q.rateMax !== undefined) p.set("rate", `${q.rateMin ?? ""}-${q.rateMax ?? ""}`);
  if (q.hasMinEntropy !== undefined) p.set("minEntropy", q.hasMinEntropy ? "yes" : "no");
  for (const t of q.tags ?? []) p.append("tag", t);
  if (q.sort) p.set("sort", q.sort);
  if (q.dir) p.set("dir", q.dir);
  if (page > 1) p.set("page", String(page));
  const s = p.toString();
  return `/library${s ? `?${s}` : ""}`;
}

/** True when the query narrows the library by anything but its words. */
function hasFilters(q: SearchQuery): boolean {
  return Boolean(q.family?.length || q.tags?.length || q.statesMin !== undefined || q.statesMax !== undefined || q.rateMin !== undefined || q.rateMax !== undefined || q.hasMinEntropy !== undefined);
}

/** The query string for a form's current values, without empty fields and without page when filters change. */
function queryStringOf(form: HTMLFormElement, keepPage: boolean): string {
  const params = new URLSearchParams();
  for (const [key, value] of new FormData(form)) {
    if (typeof value !== "string" || value.trim() === "") continue;
    if (key === "page" && !keepPage) continue;
    params.append(key, value);
  }
  return params.toString();
}

export default function Library({ loaderData }: Route.ComponentProps) {
  const { query, error } = loaderData;
  const [result, setResult] = useState<SearchResult>(loaderData.result);
  const [current, setCurrent] = useState<SearchQuery>(query);
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<string | null>(error);
  const formRef = useRef<HTMLFormElement>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const generation = useRef(0);
  const filtersRef = useRef<HTMLDetailsElement>(null);
  // On a phone the filters fold away under the search box; they start unfolded when the address
  // already sets one. React never changes `open` after the first render, so the reader's toggle stays.
  const [filtersOpen] = useState(() => hasFilters(query));

  useEffect(() => {
    // Wide screens always show the filter column (CSS unfolds the disclosure); a browser without
    // ::details-content styling gets it opened here instead.
    const details = filtersRef.current;
    const aside = details?.querySelector("aside");
    if (details && aside && window.matchMedia("(min-width: 64rem)").matches && aside.getClientRects().length === 0) details.open = true;
  }, []);

  useEffect(() => {
    setResult(loaderData.result);
    setCurrent(loaderData.query);
    setProblem(loaderData.error);
  }, [loaderData]);

  async function refresh(keepPage = false) {
    const form = formRef.current;
    if (!form) return;
    const qs = queryStringOf(form, keepPage);
    const mine = ++generation.current;
    setPending(true);
    try {
      const res = await fetch(`/api/v1/search${qs ? `?${qs}` : ""}`, { headers: { Accept: "application/json" } });
      const body = await res.json();
      if (mine !== generation.current) return;
      if (!res.ok) {
        setProblem(body?.error?.message ?? "The search could not be run.");
        return;
      }
      setProblem(null);
      setResult(body as SearchResult);
      const parsed = parseSearchParams(new URLSearchParams(qs));
      if (parsed.ok) setCurrent(parsed.value);
      window.history.replaceState(window.history.state, "", `/library${qs ? `?${qs}` : ""}`);
    } catch {
      if (mine === generation.current) setProblem("The search service did not answer; try again.");
    } finally {
      if (mine === generation.current) setPending(false);
    }
  }

  function schedule(delay = 180) {
    clearTimeout(timer.current);
    timer.current = setTimeout(() => void refresh(), delay);
  }

  function sortBy(sort: SortKey, dir: "asc" | "desc") {
    const form = formRef.current;
    if (!form) return;
    (form.elements.namedItem("sort") as HTMLInputElement).value = sort === "relevance" ? "" : sort;
    (form.elements.namedItem("dir") as HTMLInputElement).value = sort === "relevance" || dir === defaultDirection(sort) ? "" : dir;
    void refresh();
  }

  function goToPage(page: number) {
    const form = formRef.current;
    if (!form) return;
    (form.elements.namedItem("page") as HTMLInputElement).value = page > 1 ? String(page) : "";
    void refresh(true);
  }

  const pages = Math.max(1, Math.ceil(result.total / result.pageSize));
  const sort: SortKey = current.sort ?? "relevance";
  const dir = current.dir ?? defaultDirection(sort);
  const statesValue = STATE_RANGES.find((r) => r.min === current.statesMin && (r.max ?? undefined) === current.statesMax)?.value ?? "";
  const rateValue = current.rateMin !== undefined || current.rateMax !== undefined ? `${current.rateMin ?? ""}-${current.rateMax ?? ""}` : "";
  const familyCount = (f: string) => result.facets.family.find((x) => x.value === f)?.count ?? 0;
  const activeFilters =
    (current.family?.length ?? 0) +
    (current.tags?.length ?? 0) +
    (statesValue ? 1 : 0) +
    (rateValue ? 1 : 0) +
    (current.hasMinEntropy !== undefined ? 1 : 0);

  return (
    <div>
      <p className="eyebrow">The library</p>
      <h1 className="mt-1 text-3xl font-bold">Models</h1>
      <p className="mt-2 max-w-3xl text-ink-soft">
        Curated stationary process models. Every figure was recomputed by two independent routes before its edition was
        published; open a model for its parameters, verification and citation.
      </p>

      <Form
        method="get"
        action="/library"
        ref={formRef}
        className="mt-6 grid grid-cols-1 gap-x-6 gap-y-4 lg:grid-cols-[15rem_minmax(0,1fr)] lg:grid-rows-[auto_1fr]"
        onChange={(e) => {
          const target = e.target as unknown as HTMLInputElement;
          schedule(target.name === "q" || target.name === "rate" ? 220 : 0);
        }}
        onSubmit={(e) => {
          e.preventDefault();
          void refresh();
        }}
      >
        <input type="hidden" name="sort" defaultValue={query.sort ?? ""} />
        <input type="hidden" name="dir" defaultValue={query.dir ?? ""} />
        <input type="hidden" name="page" defaultValue={query.page && query.page > 1 ? String(query.page) : ""} />

        <div className="flex gap-2 lg:col-start-2 lg:row-start-1" role="search">
          <label htmlFor="library-q" className="sr-only">
            Search the library
          </label>
          <input
            id="library-q"
            name="q"
            type="search"
            defaultValue={query.q}
            autoComplete="off"
            className="field min-w-0"
            placeholder="Search titles, summaries, tags, state names…"
          />
          <button className="btn btn-primary" type="submit">
            Search
          </button>
        </div>

        <details ref={filtersRef} open={filtersOpen} className="lib-filters lg:col-start-1 lg:row-span-2 lg:row-start-1">
          <summary className="lib-filters-summary">
            Filters{activeFilters > 0 ? ` (${activeFilters} active)` : ""}
          </summary>
          <aside aria-label="Filters" className="space-y-5 text-sm">
            <fieldset>
              <legend className="eyebrow">Family</legend>
              <ul className="mt-2 space-y-1">
                {Object.entries(familyLabels).map(([value, label]) => (
                  <li key={value}>
                    <label className="flex items-center justify-between gap-2">
                      <span className="flex items-center gap-2">
                        <input type="checkbox" name="family" value={value} defaultChecked={query.family?.includes(value as never)} className="h-4 w-4 accent-accent" />
                        {label}
                      </span>
                      <span className="font-mono text-xs text-ink-soft">{familyCount(value)}</span>
                    </label>
                  </li>
                ))}
              </ul>
            </fieldset>
            <fieldset>
              <legend className="eyebrow">States</legend>
              <ul className="mt-2 flex flex-wrap gap-x-3 gap-y-1">
                <li>
                  <label className="flex items-center gap-1.5">
                    <input type="radio" name="states" value="" defaultChecked={statesValue === ""} className="accent-accent" /> any
                  </label>
                </li>
                {STATE_RANGES.map((r) => (
                  <li key={r.value}>
                    <label className="flex items-center gap-1.5">
                      <input type="radio" name="states" value={r.value} defaultChecked={statesValue === r.value} className="accent-accent" />
                      <span className="font-mono">{r.max === null ? `${r.min}+` : r.value}</span>
                    </label>
                  </li>
                ))}
              </ul>
            </fieldset>
            <div>
              <label htmlFor="rate" className="eyebrow block">
                Entropy rate, bits/symbol
              </label>
              <input
                id="rate"
                name="rate"
                type="text"
                inputMode="decimal"
                defaultValue={rateValue}
                placeholder={result.facets.rate.min !== null ? `e.g. ${result.facets.rate.min.toFixed(2)}-${(result.facets.rate.max ?? 1).toFixed(2)}` : "e.g. 0.5-0.9"}
                className="field mt-1 font-mono"
                aria-describedby="rate-help"
              />
              <p id="rate-help" className="mt-1 text-xs text-ink-soft">
                A range such as <code>0.5-0.9</code>, <code>0.99-</code> or <code>-0.1</code>.
              </p>
            </div>
            <div>
              <label htmlFor="minEntropy" className="eyebrow block">
                Min-entropy rate
              </label>
              <select id="minEntropy" name="minEntropy" defaultValue={query.hasMinEntropy === undefined ? "" : query.hasMinEntropy ? "yes" : "no"} className="field mt-1">
                <option value="">any</option>
                <option value="yes">given</option>
                <option value="no">not given</option>
              </select>
            </div>
            {result.facets.tags.length > 0 ? (
              <fieldset>
                <legend className="eyebrow">Tags</legend>
                <ul className="mt-2 space-y-1">
                  {result.facets.tags.slice(0, 14).map((t) => (
                    <li key={t.value}>
                      <label className="flex items-center justify-between gap-2">
                        <span className="flex items-center gap-2">
                          <input type="checkbox" name="tag" value={t.value} defaultChecked={query.tags?.includes(t.value)} className="h-4 w-4 accent-accent" />
                          {t.value}
                        </span>
                        <span className="font-mono text-xs text-ink-soft">{t.count}</span>
                      </label>
                    </li>
                  ))}
                </ul>
              </fieldset>
            ) : null}
            <a href="/library" className="inline-block text-sm font-semibold">
              Clear all filters
            </a>
          </aside>
        </details>

        <section aria-label="Results" className="min-w-0 lg:col-start-2 lg:row-start-2">
          <p className="text-sm text-ink-soft" role="status" aria-live="polite">
            {pending ? "Searching… " : ""}
            {result.total === 0
              ? "No model matches. Try fewer words or clear a filter."
              : `${result.total} ${result.total === 1 ? "model" : "models"}${current.q ? ` match “${current.q}”` : ""}${pages > 1 ? ` · page ${result.page} of ${pages}` : ""}.`}
          </p>
          {problem ? (
            <p role="alert" className="mt-2 rounded border border-bad/40 bg-bad/5 px-3 py-2 text-sm text-bad">
              {problem}
            </p>
          ) : null}
          <div className={`mt-3 transition-opacity ${pending ? "opacity-70" : ""}`}>
            {result.rows.length > 0 ? <ResultsTable rows={result.rows} sort={sort} dir={dir} onSort={sortBy} /> : null}
          </div>
          {pages > 1 ? (
            <nav aria-label="Pages" className="mt-4 flex items-center gap-3 text-sm">
              {result.page > 1 ? (
                <a
                  className="btn btn-quiet no-underline"
                  href={pageHref(current, result.page - 1)}
                  onClick={(e) => {
                    e.preventDefault();
                    goToPage(result.page - 1);
                  }}
                >
                  ← Previous
                </a>
              ) : null}
              <span className="figures">
                Page {result.page} of {pages}
              </span>
              {result.page < pages ? (
                <a
                  className="btn btn-quiet no-underline"
                  href={pageHref(current, result.page + 1)}
                  onClick={(e) => {
                    e.preventDefault();
                    goToPage(result.page + 1);
                  }}
                >
                  Next →
                </a>
              ) : null}
            </nav>
          ) : null}
        </section>
      </Form>
    </div>
  );
}
