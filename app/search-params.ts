/**
 * The library search query, as it appears in a URL (client-safe). The library page and
 * GET /api/v1/search parse the same parameters with `parseSearchParams`:
 *
 *   q           words; prefixes and small typos match
 *   family      repeatable: iid, markov, two-state, graph-walk, hidden
 *   states      a state count or range: `2`, `3-4`, `17-` (at least 17), `-8` (at most 8)
 *   rate        an entropy-rate range in bits/symbol: `0.5-0.9`, `0.99-`, `-0.2`
 *   minEntropy  `yes` (only models with a min-entropy rate) or `no` (only those without)
 *   tag         repeatable; a model must carry every tag given
 *   sort        relevance | title | rate | states | updated
 *   dir         asc | desc (each sort has its natural default)
 *   page        1, 2, …
 *   pageSize    1 to 100 (default 20)
 */
import { z } from "zod";
import { FAMILIES, type Family } from "~/engine";

export const SEARCH_SORTS = ["relevance", "title", "rate", "states", "updated"] as const;
export type SearchSort = (typeof SEARCH_SORTS)[number];
export const DEFAULT_PAGE_SIZE = 20;
export const MAX_PAGE_SIZE = 100;
/** Longest query text accepted; longer text is a mistake, not a search. */
export const MAX_QUERY_LENGTH = 200;

/** The parsed query that `searchLibrary` takes. */
export interface SearchQuery {
  q: string;
  family?: Family[];
  statesMin?: number;
  statesMax?: number;
  rateMin?: number;
  rateMax?: number;
  hasMinEntropy?: boolean;
  tags?: string[];
  sort?: SearchSort;
  dir?: "asc" | "desc";
  page?: number;
  pageSize?: number;
}

/** The state-count ranges a filter panel offers (`max` null: no upper end). */
export const STATE_RANGES: { value: string; min: number; max: number | null }[] = [
  { value: "2", min: 2, max: 2 },
  { value: "3-4", min: 3, max: 4 },
  { value: "5-8", min: 5, max: 8 },
  { value: "9-16", min: 9, max: 16 },
  { value: "17-", min: 17, max: null },
];

/** The natural direction of each sort when `dir` is not given. */
export function defaultDirection(sort: SearchSort): "asc" | "desc" {
  return sort === "title" || sort === "states" ? "asc" : "desc";
}

const NUMBER = /^(?:\d+(?:\.\d*)?|\.\d+)(?:e[+-]?\d+)?$/i;

/**
 * Reads `a-b`, `a`, `a-` or `-b` (an en dash works too) into bounds; null when the text is not a
 * range. `integers` demands whole numbers. Pure, O(length).
 */
export function parseRange(text: string, integers: boolean): { min?: number; max?: number } | null {
  const t = text.trim().replace(/[–—]/g, "-");
  if (t === "") return null;
  const parts = t.split("-");
  if (parts.length > 2) return null;
  const read = (s: string): number | undefined | null => {
    const v = s.trim();
    if (v === "") return undefined;
    if (!NUMBER.test(v)) return null;
    const n = Number(v);
    if (!Number.isFinite(n) || (integers && !Number.isSafeInteger(n))) return null;
    return n;
  };
  const min = read(parts[0]);
  const max = parts.length === 2 ? read(parts[1]) : min;
  if (min === null || max === null) return null;
  if (min === undefined && max === undefined) return null;
  if (min !== undefined && max !== undefined && min > max) return null;
  return { ...(min !== undefined ? { min } : {}), ...(max !== undefined ? { max } : {}) };
}

/** Writes bounds back as the URL form `parseRange` reads. */
export function formatRange(min?: number | null, max?: number | null): string {
  const lo = min ?? undefined;
  const hi = max ?? undefined;
  if (lo !== undefined && hi !== undefined && lo === hi) return String(lo);
  return `${lo ?? ""}-${hi ?? ""}`;
}

const one = (v: unknown) => (Array.isArray(v) ? v[v.length - 1] : v);
const many = (v: unknown) => (v === undefined ? [] : Array.isArray(v) ? v : [v]);

/**
 * The URL parameters as an object (repeated keys become arrays) validated and turned into a
 * SearchQuery. Unknown parameters are ignored, so links may carry other keys.
 */
export const searchParamsSchema = z
  .object({
    q: z.preprocess(one, z.string().max(MAX_QUERY_LENGTH, `q must be at most ${MAX_QUERY_LENGTH} characters`).optional()),
    family: z.preprocess(
      many,
      z.array(z.enum(FAMILIES, { error: `family must be one of ${FAMILIES.join(", ")}` })).max(FAMILIES.length * 2),
    ),
    states: z.preprocess(
      one,
      z
        .string()
        .optional()
        .transform((v, ctx) => {
          if (v === undefined || v.trim() === "") return undefined;
          const r = parseRange(v, true);
          if (!r || (r.min !== undefined && r.min < 1)) {
            ctx.addIssue({ code: "custom", message: "states must be a count of at least 1 or a range such as 3-4, 17- or -8" });
            return z.NEVER;
          }
          return r;
        }),
    ),
    rate: z.preprocess(
      one,
      z
        .string()
        .optional()
        .transform((v, ctx) => {
          if (v === undefined || v.trim() === "") return undefined;
          const r = parseRange(v, false);
          if (!r) {
            ctx.addIssue({ code: "custom", message: "rate must be a range in bits/symbol such as 0.5-0.9, 0.99- or -0.2" });
            return z.NEVER;
          }
          return r;
        }),
    ),
    minEntropy: z.preprocess(
      one,
      z
        .enum(["yes", "no", "true", "false", "1", "0", ""], { error: "minEntropy must be yes or no" })
        .optional()
        .transform((v) => (v === undefined || v === "" ? undefined : v === "yes" || v === "true" || v === "1")),
    ),
    tag: z.preprocess(many, z.array(z.string().trim().min(1, "tag must not be empty").max(80)).max(20, "at most 20 tags")),
    sort: z.preprocess(one, z.enum(SEARCH_SORTS, { error: `sort must be one of ${SEARCH_SORTS.join(", ")}` }).optional()),
    dir: z.preprocess(one, z.enum(["asc", "desc"], { error: "dir must be asc or desc" }).optional()),
    page: z.preprocess(
      one,
      z
        .string()
        .regex(/^\d{1,6}$/, "page must be a whole number from 1")
        .transform(Number)
        .refine((n) => n >= 1, "page must be a whole number from 1")
        .optional(),
    ),
    pageSize: z.preprocess(
      one,
      z
        .string()
        .regex(/^\d{1,3}$/, `pageSize must be a whole number from 1 to ${MAX_PAGE_SIZE}`)
        .transform(Number)
        .refine((n) => n >= 1 && n <= MAX_PAGE_SIZE, `pageSize must be a whole number from 1 to ${MAX_PAGE_SIZE}`)
        .optional(),
    ),
  })
  .transform((p): SearchQuery => {
    const query: SearchQuery = { q: (p.q ?? "").trim() };
    if (p.family.length) query.family = [...new Set(p.family)];
    if (p.states?.min !== undefined) query.statesMin = p.states.min;
    if (p.states?.max !== undefined) query.statesMax = p.states.max;
    if (p.rate?.min !== undefined) query.rateMin = p.rate.min;
    if (p.rate?.max !== undefined) query.rateMax = p.rate.max;
    if (p.minEntropy !== undefined) query.hasMinEntropy = p.minEntropy;
    if (p.tag.length) query.tags = [...new Set(p.tag)];
    if (p.sort) query.sort = p.sort;
    if (p.dir) query.dir = p.dir;
    if (p.page) query.page = p.page;
    if (p.pageSize) query.pageSize = p.pageSize;
    return query;
  });

/** URLSearchParams as a plain object; a repeated key becomes an array. */
export function searchParamsToObject(params: URLSearchParams): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {};
  for (const [key, value] of params) {
    const prev = out[key];
    out[key] = prev === undefined ? value : Array.isArray(prev) ? [...prev, value] : [prev, value];
  }
  return out;
}

export type ParsedSearch =
  | { ok: true; value: SearchQuery }
  | { ok: false; error: { message: string; issues: { path: string; message: string }[] } };

/** Parses a URL's search parameters; on failure, the API error body (which parameter, why). */
export function parseSearchParams(params: URLSearchParams): ParsedSearch {
  const parsed = searchParamsSchema.safeParse(searchParamsToObject(params));
  if (parsed.success) return { ok: true, value: parsed.data };
  const issues = parsed.error.issues.map((i) => ({ path: String(i.path[0] ?? ""), message: i.message }));
  const names = [...new Set(issues.map((i) => i.path).filter(Boolean))];
  return {
    ok: false,
    error: { message: `Some search parameters are not valid${names.length ? `: ${names.join(", ")}` : ""}.`, issues },
  };
}

/** The URL query for a SearchQuery (defaults left out), for links and the library page. */
export function toSearchParams(query: Partial<SearchQuery>): URLSearchParams {
  const out = new URLSearchParams();
  if (query.q) out.set("q", query.q);
  for (const f of query.family ?? []) out.append("family", f);
  if (query.statesMin !== undefined || query.statesMax !== undefined) out.set("states", formatRange(query.statesMin, query.statesMax));
  if (query.rateMin !== undefined || query.rateMax !== undefined) out.set("rate", formatRange(query.rateMin, query.rateMax));
  if (query.hasMinEntropy !== undefined) out.set("minEntropy", query.hasMinEntropy ? "yes" : "no");
  for (const t of query.tags ?? []) out.append("tag", t);
  if (query.sort && query.sort !== "relevance") out.set("sort", query.sort);
  if (query.dir && query.dir !== defaultDirection(query.sort ?? "relevance")) out.set("dir", query.dir);
  if (query.page && query.page > 1) out.set("page", String(query.page));
  if (query.pageSize && query.pageSize !== DEFAULT_PAGE_SIZE) out.set("pageSize", String(query.pageSize));
  return out;
}
