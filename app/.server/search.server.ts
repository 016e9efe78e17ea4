/**
 * Library search: a minisearch index over the models (title, summary, tags, family and its
 * label, and the state/alphabet/node names of each model's latest edition) with facet filters.
 *
 * The index lives in memory, one per server process, built on first use. App servers are
 * stateless and several may run against one database, so before answering, a search checks at
 * most once a second a cheap "library version" (edition and model counts and their newest
 * timestamps) and rebuilds when it changed; the publishing path may also call
 * `invalidateSearchIndex()` to have the next search rebuild at once. Each index keeps the matches
 * of single words (so typing recomputes only the word being typed) and of whole query texts (so a
 * facet click or a page turn recomputes none); both go with the index when it is rebuilt.
 * See docs/decisions/0005-search.md.
 */
import MiniSearch, { type SearchOptions } from "minisearch";
import { sql } from "drizzle-orm";
import { familyLabels } from "~/families";
import { DEFAULT_PAGE_SIZE, MAX_PAGE_SIZE, STATE_RANGES, defaultDirection, type SearchQuery, type SearchSort } from "~/search-params";
import { FAMILIES } from "~/engine";
import { db } from "./db.server";
import type { LibraryRow } from "./library.server";

export type { SearchQuery } from "~/search-params";

export interface SearchRow extends LibraryRow {
  /** The relevance score of a text query; null when there is no query text. */
  score: number | null;
}

export interface FacetCount {
  value: string;
  count: number;
}

export interface SearchFacets {
  family: FacetCount[];
  tags: FacetCount[];
  states: { min: number | null; max: number | null };
  rate: { min: number | null; max: number | null };
  /** Counts per state-count range (STATE_RANGES), under the other active filters. */
  stateRanges: { value: string; min: number; max: number | null; count: number }[];
  minEntropy: { with: number; without: number };
}

export interface SearchResult {
  total: number;
  page: number;
  pageSize: number;
  sort: SearchSort;
  dir: "asc" | "desc";
  rows: SearchRow[];
  facets: SearchFacets;
}

export interface SearchIndexOptions {
  /** Include generated scale-test models (models.is_synthetic); the library never does. */
  includeSynthetic?: boolean;
}

/** How many state/alphabet/node names of one edition are indexed (a large graph has many). */
const MAX_NAMES = 200;
/** How many tag facet values are returned, most frequent first. */
const MAX_TAG_FACETS = 60;
const VERSION_CHECK_MS = 1000;
/** Text matches kept per index, by query text: typing and facet clicks repeat the same words. */
const TEXT_CACHE_SIZE = 256;
/**
 * Matches of single words, kept across queries up to this many (document, score) pairs in all
 * (12 bytes each): typing "buoy uplink b…" recomputes only the word being typed.
 */
const WORD_CACHE_ENTRIES = 2_000_000;

/** Words too common to tell models apart; left out of the index and of queries. */
const STOP_WORDS = new Set(["a", "an", "and", "as", "at", "by", "for", "from", "in", "into", "is", "it", "its", "of", "on", "or", "the", "to", "with"]);

/** Lower-cases a term and drops stop words (the same rule for documents and queries). */
export function processTerm(term: string): string | null {
  const t = term.toLowerCase();
  return STOP_WORDS.has(t) ? null : t;
}

/** The indexed fields, in minisearch's order (a document's score adds up its fields in this order). */
const FIELDS = ["title", "summary", "tags", "family", "names"] as const;
/** Field boosts: a title hit outranks the same word in a summary. */
const BOOST: Record<(typeof FIELDS)[number], number> = { title: 3, tags: 2, family: 1.5, names: 1, summary: 1 };
/**
 * Typo allowance 0.2 of a term's length (one edit from 4 letters, two from 8). Shorter terms get
 * none: one edit in a 3-letter word matches a large part of the vocabulary and mostly adds noise.
 * Prefixes match from 2 letters, so a word is found while it is being typed.
 */
const TEXT_OPTIONS: SearchOptions = {
  fuzzy: (term) => (term.length >= 4 ? 0.2 : false),
  prefix: (term) => term.length >= 2,
  boost: BOOST,
};

interface Doc {
  /** The document's position in BuiltIndex.all, and its id in the minisearch index. */
  id: number;
  slug: string;
  title: string;
  family: string;
  summary: string;
  tags: string[];
  tagKeys: string[];
  /** Indices into BuiltIndex.tagValues, one per distinct tag key. */
  tagIds: number[];
  latestEdition: number;
  states: number | null;
  entropyRateBits: number | null;
  minEntropyRateBits: number | null;
  updatedAt: Date;
  names: string;
  titleRank: number;
  updatedRank: number;
  /** Index into FAMILIES (facet counting without a Map lookup per match). */
  familyIndex: number;
  /** Indices into STATE_RANGES of the ranges holding `states`. */
  stateRanges: number[];
}

/** An index of the library (or of a list of models, in tests). */
export interface BuiltIndex {
  version: string;
  /** Tokenizes and holds the vocabulary and postings; queries read them through `postings`. */
  mini: MiniSearch;
  postings: Postings;
  /** Scoring buffers, one slot per document, all zero between uses (searches run one at a time). */
  scratch: { sum: Float64Array; seen: Int32Array; mark: Uint8Array };
  all: Doc[];
  /** The display form of each tag (the first spelling met), by tag id. */
  tagValues: string[];
  /** Tag ids by tagKey. */
  tagIdByKey: Map<string, number>;
  textCache: Map<string, Candidate[]>;
  wordCache: Map<string, WordHits>;
  wordCacheEntries: number;
  builtInMs: number;
}

interface IndexSlot {
  index?: BuiltIndex;
  building?: Promise<BuiltIndex>;
  checkedAt: number;
  stale: boolean;
}

const slots = new Map<boolean, IndexSlot>();

function slot(includeSynthetic: boolean): IndexSlot {
  let s = slots.get(includeSynthetic);
  if (!s) {
    s = { checkedAt: 0, stale: true };
    slots.set(includeSynthetic, s);
  }
  return s;
}

/** Marks every index stale: the next search rebuilds it (call after publishing or retracting). */
export function invalidateSearchIndex(): void {
  for (const s of slots.values()) s.stale = true;
}

/** A cheap fingerprint of the library's content; changes with any publish, retraction or model edit. */
async function libraryVersion(): Promise<string> {
  const result = await db().execute(sql`
    select (select count(*) from editions)::int as editions,
           (select max(published_at) from editions) as published,
           (select max(retracted_at) from editions) as retracted,
           (select count(*) from models)::int as models,
           (select count(*) from models where is_synthetic)::int as synthetic,
           (select max(updated_at) from models) as updated`);
  const row = result.rows[0] as Record<string, unknown>;
  const stamp = (v: unknown) => (v instanceof Date ? v.toISOString() : String(v ?? ""));
  return [row.editions, stamp(row.published), stamp(row.retracted), row.models, row.synthetic, stamp(row.updated)].join("|");
}

const numberOrNull = (v: unknown): number | null => {
  if (v === null || v === undefined) return null;
  const n = Number(v);
  return Number.isFinite(n) ? n : null;
};

/** One model as the index takes it: its text and its current edition's figures. */
export interface IndexedModel {
  slug: string;
  title: string;
  family: string;
  summary: string;
  tags: string[];
  /** The number of the current edition (the newest not retracted, else the newest). */
  latestEdition: number;
  states: number | null;
  entropyRateBits: number | null;
  minEntropyRateBits: number | null;
  updatedAt: Date;
  /** The edition's alphabet, state and node names, space-separated (at most MAX_NAMES). */
  names: string;
}

/** Loads every model with its latest edition (newest not retracted, else newest) and indexes it. */
async function buildIndex(includeSynthetic: boolean): Promise<BuiltIndex> {
  const started = performance.now();
  const version = await libraryVersion();
  const result = await db().execute(sql`
    select distinct on (m.id)
      m.slug, m.title, m.family::text as family, m.summary, m.tags, m.updated_at,
      e.number,
      (e.figures -> 'entropyRate' ->> 'bits')::float8 as rate,
      (e.figures -> 'minEntropyRate' ->> 'bits')::float8 as min_rate,
      case when jsonb_typeof(e.figures -> 'states') = 'array' then jsonb_array_length(e.figures -> 'states') end as states,
      (select string_agg(v, ' ') from (
         select jsonb_array_elements_text(
           case when jsonb_typeof(e.params -> 'alphabet') = 'array' then e.params -> 'alphabet' else '[]'::jsonb end ||
           case when jsonb_typeof(e.params -> 'states') = 'array' then e.params -> 'states' else '[]'::jsonb end ||
           case when jsonb_typeof(e.params -> 'nodes') = 'array' then e.params -> 'nodes' else '[]'::jsonb end
         ) as v limit ${MAX_NAMES}) names) as names
    from models m
    join editions e on e.model_id = m.id
    where ${includeSynthetic ? sql`true` : sql`not m.is_synthetic`}
    order by m.id, (e.retracted_at is null) desc, e.number desc`);
  const models: IndexedModel[] = (result.rows as Record<string, unknown>[]).map((r) => ({
    slug: String(r.slug),
    title: String(r.title),
    family: String(r.family),
    summary: String(r.summary),
    tags: (r.tags as string[] | null) ?? [],
    latestEdition: Number(r.number),
    states: numberOrNull(r.states),
    entropyRateBits: numberOrNull(r.rate),
    minEntropyRateBits: numberOrNull(r.min_rate),
    updatedAt: r.updated_at instanceof Date ? r.updated_at : new Date(String(r.updated_at)),
    names: typeof r.names === "string" ? r.names : "",
  }));
  const built = createSearchIndex(models, version);
  built.builtInMs = performance.now() - started;
  return built;
}

/**
 * An index over `models` (in this order), without the database: the server builds it from
 * PostgreSQL; tests build it from the catalogue files. Cost: O(total text) plus two sorts.
 */
export function createSearchIndex(models: readonly IndexedModel[], version = ""): BuiltIndex {
  const started = performance.now();
  const familyIndex = new Map<string, number>(FAMILIES.map((f, i) => [f, i]));
  const all: Doc[] = models.map((m, id) => {
    const states = m.states;
    return {
      id,
      slug: m.slug,
      title: m.title,
      family: m.family,
      summary: m.summary,
      tags: m.tags,
      tagKeys: m.tags.map(tagKey),
      latestEdition: m.latestEdition,
      states,
      entropyRateBits: m.entropyRateBits,
      minEntropyRateBits: m.minEntropyRateBits,
      updatedAt: m.updatedAt,
      names: m.names,
      titleRank: 0,
      updatedRank: 0,
      tagIds: [],
      familyIndex: familyIndex.get(m.family) ?? -1,
      stateRanges: states === null ? [] : STATE_RANGES.flatMap((g, i) => (states >= g.min && (g.max === null || states <= g.max) ? [i] : [])),
    };
  });
  const tagIds = new Map<string, number>();
  const tagValues: string[] = [];
  for (const d of all) {
    const ids = new Set<number>();
    d.tags.forEach((t, i) => {
      let id = tagIds.get(d.tagKeys[i]);
      if (id === undefined) {
        id = tagValues.length;
        tagIds.set(d.tagKeys[i], id);
        tagValues.push(t);
      }
      ids.add(id);
    });
    d.tagIds = [...ids];
  }
  // Sorting by title happens on every query; rank once with a collator instead of comparing strings.
  const collator = new Intl.Collator("en", { sensitivity: "base", numeric: true });
  [...all]
    .sort((a, b) => collator.compare(a.title, b.title) || (a.slug < b.slug ? -1 : 1))
    .forEach((d, i) => (d.titleRank = i));
  [...all].sort((a, b) => a.updatedAt.getTime() - b.updatedAt.getTime() || a.titleRank - b.titleRank).forEach((d, i) => (d.updatedRank = i));

  const mini = new MiniSearch<{ id: number; title: string; summary: string; tags: string; family: string; names: string }>({
    fields: [...FIELDS],
    storeFields: [],
    processTerm,
    searchOptions: TEXT_OPTIONS,
  });
  mini.addAll(
    all.map((d) => ({
      id: d.id,
      title: d.title,
      summary: d.summary,
      tags: d.tags.join(" "),
      family: `${d.family} ${familyLabels[d.family] ?? ""}`,
      names: d.names,
    })),
  );
  return {
    version,
    mini,
    postings: postingsOf(mini, all.length),
    scratch: { sum: new Float64Array(all.length), seen: new Int32Array(all.length), mark: new Uint8Array(all.length) },
    all,
    tagValues,
    tagIdByKey: tagIds,
    textCache: new Map(),
    wordCache: new Map(),
    wordCacheEntries: 0,
    builtInMs: performance.now() - started,
  };
}

/** The current index for these options, built or refreshed as needed. */
async function currentIndex(options: SearchIndexOptions = {}): Promise<BuiltIndex> {
  const includeSynthetic = options.includeSynthetic ?? false;
  const s = slot(includeSynthetic);
  if (s.building) return s.building;
  const now = Date.now();
  if (s.index && !s.stale) {
    if (now - s.checkedAt < VERSION_CHECK_MS) return s.index;
    s.checkedAt = now;
    if ((await libraryVersion()) === s.index.version) return s.index;
  }
  if (s.building) return s.building;
  s.building = buildIndex(includeSynthetic).finally(() => (s.building = undefined));
  const built = await s.building;
  s.index = built;
  s.stale = false;
  s.checkedAt = Date.now();
  return built;
}

/** The index searches use now, built or refreshed as needed (the benchmark checks its scores). */
export function currentSearchIndex(options: SearchIndexOptions = {}): Promise<BuiltIndex> {
  return currentIndex(options);
}

/** Builds the index afresh now (benchmarks, warm-up); returns its size and build time. */
export async function rebuildSearchIndex(options: SearchIndexOptions = {}): Promise<{ documents: number; ms: number }> {
  const s = slot(options.includeSynthetic ?? false);
  s.stale = true;
  const built = await currentIndex(options);
  return { documents: built.all.length, ms: built.builtInMs };
}

/** Tag comparison ignores case and surrounding spaces. */
export function tagKey(tag: string): string {
  return tag.trim().toLowerCase();
}

interface Candidate {
  doc: Doc;
  score: number | null;
}

/**
 * Text matches for `q`: every word must match (as a word, a prefix or within the typo allowance);
 * when no model matches all the words, models matching any of them are returned instead.
 */
function textMatches(index: BuiltIndex, q: string): Candidate[] {
  const key = q.toLowerCase();
  const cached = index.textCache.get(key);
  if (cached) {
    index.textCache.delete(key); // least recently used goes first
    index.textCache.set(key, cached);
    return cached;
  }
  const found = findText(index, q);
  index.textCache.set(key, found);
  if (index.textCache.size > TEXT_CACHE_SIZE) index.textCache.delete(index.textCache.keys().next().value!);
  return found;
}

/** Clears the cached text matches (the benchmark times uncached searches with it). */
export function clearSearchTextCache(): void {
  for (const s of slots.values()) {
    if (!s.index) continue;
    s.index.textCache.clear();
    s.index.wordCache.clear();
    s.index.wordCacheEntries = 0;
  }
}

/** One word's matches: document ids (positions in BuiltIndex.all) and minisearch's score of the word alone. */
export interface WordHits {
  ids: Int32Array;
  scores: Float64Array;
}

const tokenize = MiniSearch.getDefault("tokenize") as (text: string) => string[];

/** The query's terms as minisearch derives them: its tokenizer, then processTerm. */
export function queryTerms(q: string): string[] {
  return tokenize(q)
    .map((t) => processTerm(t))
    .filter((t): t is string => !!t);
}

// ---------------------------------------------------------------------------------------------
// Scoring one word. minisearch's own search builds a result object per matching document (with
// the matched terms and fields) and sorts them; for a word found in a third of the library or
// more that was most of a query's time. scoreWord computes the same scores, operation for
// operation (minisearch 7.2's executeQuerySpec, termResults and calcBM25Score with the default
// weights and BM25 parameters), into a flat buffer, reading minisearch's vocabulary and postings.
// tests/unit/search-word-scores.test.ts checks it against minisearch's search for every word of
// the catalogue, so an upgrade that changes either side fails there.

/** A term's postings: field id → (minisearch's short document id → occurrences in that field). */
type TermData = Map<number, Map<number, number>>;

/** The parts of minisearch's index the scorer reads (present in minisearch 7). */
interface MiniInternals {
  _index: {
    get(term: string): TermData | undefined;
    atPrefix(prefix: string): Iterable<[string, TermData]>;
    fuzzyGet(term: string, maxDistance: number): Map<string, [TermData, number]>;
  };
  _fieldIds: Record<string, number>;
  _fieldLength: Map<number, number[]>;
  _avgFieldLength: number[];
  _documentCount: number;
  _documentIds: Map<number, unknown>;
}

/** What scoreWord needs of an index, taken out once per build. */
interface Postings {
  vocabulary: MiniInternals["_index"];
  /** Per field in FIELDS order: minisearch's field id, its boost and average length. */
  fields: { id: number; boost: number; avgLength: number }[];
  /** Field lengths by [field id][short document id] (unique terms, as minisearch counts them). */
  lengths: Float64Array[];
  /** Our document id (position in BuiltIndex.all) by minisearch's short id. */
  docIds: Int32Array;
  documentCount: number;
}

/** minisearch's defaults (defaultSearchOptions in minisearch 7): BM25+ parameters, match weights. */
const BM25 = { k: 1.2, b: 0.7, d: 0.5 };
const MATCH_WEIGHTS = { fuzzy: 0.45, prefix: 0.375 };
const MAX_FUZZY = 6;
/**
 * Words from this length get transposition variants, as they get a typo allowance: a swap in a
 * 3-letter word mostly lands on another common word ("rae" → "are", in nearly every summary).
 */
const TRANSPOSITION_MIN_LENGTH = 4;

function postingsOf(mini: MiniSearch, documents: number): Postings {
  const m = mini as unknown as MiniInternals;
  if (!m._index || typeof m._index.atPrefix !== "function" || !(m._fieldLength instanceof Map) || !(m._documentIds instanceof Map)) {
    throw new Error("search: this minisearch version does not have the index layout the word scorer reads (minisearch 7)");
  }
  const lengths: Float64Array[] = [];
  const fields = FIELDS.map((name) => {
    const id = m._fieldIds[name];
    lengths[id] = new Float64Array(documents);
    return { id, boost: BOOST[name], avgLength: m._avgFieldLength[id] };
  });
  const docIds = new Int32Array(m._documentIds.size);
  for (const [short, id] of m._documentIds) docIds[short] = id as number;
  for (const [short, perField] of m._fieldLength) {
    for (const f of fields) lengths[f.id][short] = perField[f.id];
  }
  return { vocabulary: m._index, fields, lengths, docIds, documentCount: m._documentCount };
}

/**
 * The words one adjacent swap away from `term` ("bouy" → "obuy", "buoy", "boyu"), each once,
 * `term` itself left out.
 */
export function adjacentTranspositions(term: string): string[] {
  const out = new Set<string>();
  const chars = [...term];
  for (let i = 0; i + 1 < chars.length; i++) {
    if (chars[i] === chars[i + 1]) continue;
    const swapped = [...chars];
    [swapped[i], swapped[i + 1]] = [swapped[i + 1], swapped[i]];
    out.add(swapped.join(""));
  }
  out.delete(term);
  return [...out];
}

/**
 * One query word's matches and scores, as minisearch's search for the word alone scores them:
 * the word itself (weight 1), every longer word it begins (prefix weight), every word within the
 * typo allowance (fuzzy weight), each field's BM25+ score times the field's boost, added up per
 * document in that order. When the word is neither in the vocabulary nor the beginning of any word
 * in it, the vocabulary words one adjacent transposition away that the typo allowance did not
 * already reach ("bouy" → "buoy": two edits) are added with the weight of a one-edit typo
 * (`transpositions: false` leaves them out, to compare with minisearch's own search).
 * Cost: O(postings of the matched words); allocates only the result.
 */
export function scoreWord(index: BuiltIndex, term: string, options: { transpositions?: boolean } = {}): WordHits {
  const p = index.postings;
  const { sum, mark } = index.scratch;
  const touched: number[] = [];
  const { k, b, d } = BM25;
  const add = (weight: number, data: TermData | undefined) => {
    if (!data) return;
    for (const f of p.fields) {
      const freqs = data.get(f.id);
      if (!freqs) continue;
      const matching = freqs.size;
      const invDocFreq = Math.log(1 + (p.documentCount - matching + 0.5) / (matching + 0.5));
      const weighted = weight * f.boost;
      const lengths = p.lengths[f.id];
      const avgFieldLength = f.avgLength;
      for (const [short, termFreq] of freqs) {
        const fieldLength = lengths[short];
        const rawScore = invDocFreq * (d + (termFreq * (k + 1)) / (termFreq + k * (1 - b + (b * fieldLength) / avgFieldLength)));
        const id = p.docIds[short];
        if (!mark[id]) {
          mark[id] = 1;
          touched.push(id);
        }
        sum[id] += weighted * rawScore;
      }
    }
  };

  const exact = p.vocabulary.get(term);
  add(1, exact);
  const fuzzy = (TEXT_OPTIONS.fuzzy as (t: string, i: number, all: string[]) => number | false)(term, 0, [term]);
  const prefix = (TEXT_OPTIONS.prefix as (t: string, i: number, all: string[]) => boolean)(term, 0, [term]);
  let fuzzyMatches: Map<string, [TermData, number]> | undefined;
  if (fuzzy) {
    const maxDistance = fuzzy < 1 ? Math.min(MAX_FUZZY, Math.round(term.length * fuzzy)) : fuzzy;
    if (maxDistance) fuzzyMatches = p.vocabulary.fuzzyGet(term, maxDistance);
  }
  let begins = false;
  if (prefix) {
    for (const [word, data] of p.vocabulary.atPrefix(term)) {
      const distance = word.length - term.length;
      if (!distance) continue;
      begins = true;
      fuzzyMatches?.delete(word); // scored as a prefix match only
      add((MATCH_WEIGHTS.prefix * word.length) / (word.length + 0.3 * distance), data);
    }
  }
  if (fuzzyMatches) {
    for (const [word, [data, distance]] of fuzzyMatches) {
      if (!distance) continue;
      add((MATCH_WEIGHTS.fuzzy * word.length) / (word.length + distance), data);
    }
  }
  if (options.transpositions !== false && !exact && !begins && term.length >= TRANSPOSITION_MIN_LENGTH) {
    for (const word of adjacentTranspositions(term)) {
      if (fuzzyMatches?.has(word)) continue;
      add((MATCH_WEIGHTS.fuzzy * word.length) / (word.length + 1), p.vocabulary.get(word));
    }
  }

  const found: WordHits = { ids: new Int32Array(touched.length), scores: new Float64Array(touched.length) };
  for (let i = 0; i < touched.length; i++) {
    const id = touched[i];
    found.ids[i] = id;
    found.scores[i] = sum[id];
    sum[id] = 0;
    mark[id] = 0;
  }
  return found;
}

function wordHits(index: BuiltIndex, term: string): WordHits {
  const cached = index.wordCache.get(term);
  if (cached) {
    index.wordCache.delete(term); // least recently used goes first
    index.wordCache.set(term, cached);
    return cached;
  }
  const found = scoreWord(index, term);
  index.wordCache.set(term, found);
  index.wordCacheEntries += found.ids.length;
  while (index.wordCacheEntries > WORD_CACHE_ENTRIES && index.wordCache.size > 1) {
    const [oldest, entry] = index.wordCache.entries().next().value!;
    index.wordCache.delete(oldest);
    index.wordCacheEntries -= entry.ids.length;
  }
  return found;
}

/**
 * Combines per-word matches exactly as minisearch combines the terms of one query: a document's
 * score is the sum of its words' scores, in query order, times the number of distinct words it
 * matched. With `all`, only documents matching every word count (AND), else any word (OR).
 */
function combineWords(index: BuiltIndex, terms: string[], all: boolean): Candidate[] {
  const lists = terms.map((t) => wordHits(index, t));
  const out: Candidate[] = [];
  if (lists.length === 1) {
    // One word: its own scores (0 + s, times one distinct word).
    const [list] = lists;
    for (let i = 0; i < list.ids.length; i++) out.push({ doc: index.all[list.ids[i]], score: list.scores[i] });
    return out;
  }
  // The index's buffers, all zero between uses; only the entries touched here are reset.
  const { sum, seen, mark } = index.scratch; // AND: how many of the words so far matched; OR: distinct words matched
  const distinct = [...new Set(terms)];
  if (all) {
    lists.forEach((list, w) => {
      for (let i = 0; i < list.ids.length; i++) {
        const id = list.ids[i];
        if (seen[id] !== w) continue;
        sum[id] += list.scores[i];
        seen[id] = w + 1;
      }
    });
    const last = lists[lists.length - 1];
    for (let i = 0; i < last.ids.length; i++) {
      const id = last.ids[i];
      if (seen[id] === lists.length) out.push({ doc: index.all[id], score: sum[id] * distinct.length });
    }
    // Only the first word's models can have been touched.
    for (const id of lists[0].ids) {
      sum[id] = 0;
      seen[id] = 0;
    }
    return out;
  }
  const order: number[] = [];
  for (const list of lists) {
    for (let i = 0; i < list.ids.length; i++) {
      const id = list.ids[i];
      if (!mark[id]) {
        mark[id] = 1;
        order.push(id);
      }
      sum[id] += list.scores[i];
    }
  }
  for (const t of distinct) {
    const list = lists[terms.indexOf(t)];
    for (let i = 0; i < list.ids.length; i++) seen[list.ids[i]]++;
  }
  for (const id of order) {
    out.push({ doc: index.all[id], score: sum[id] * seen[id] });
    sum[id] = 0;
    seen[id] = 0;
    mark[id] = 0;
  }
  return out;
}

function findText(index: BuiltIndex, q: string): Candidate[] {
  if (q === "") return index.all.map((doc) => ({ doc, score: null }));
  const terms = queryTerms(q);
  if (terms.length === 0) return [];
  const every = combineWords(index, terms, true);
  return every.length > 0 ? every : combineWords(index, terms, false);
}

/** Bits of the facets whose filter rejects a model (see rejections). */
const REJECTED_BY = { family: 1, states: 2, rate: 4, minEntropy: 8, tags: 16 } as const;

/**
 * The query's filters as one test: for a model, the bits (REJECTED_BY) of the active filters that
 * reject it; 0 when it passes them all. A facet's counts take the models that pass every filter
 * but its own, so the caller needs to know which one failed, not just whether one did.
 */
function rejections(query: SearchQuery, index: Pick<BuiltIndex, "tagIdByKey">): (d: Doc) => number {
  let families: Uint8Array | null = null;
  if (query.family?.length) {
    families = new Uint8Array(FAMILIES.length);
    for (const f of query.family) {
      const i = (FAMILIES as readonly string[]).indexOf(f);
      if (i >= 0) families[i] = 1;
    }
  }
  // A tag no model has matches nothing: id -1 is in no model's list.
  const tags = query.tags?.length ? query.tags.map((t) => index.tagIdByKey.get(tagKey(t)) ?? -1) : null;
  const { statesMin, statesMax, rateMin, rateMax, hasMinEntropy } = query;
  const byStates = statesMin !== undefined || statesMax !== undefined;
  const byRate = rateMin !== undefined || rateMax !== undefined;
  return (d) => {
    let bits = 0;
    if (families !== null && !(d.familyIndex >= 0 && families[d.familyIndex] === 1)) bits |= REJECTED_BY.family;
    if (byStates && !(d.states !== null && (statesMin === undefined || d.states >= statesMin) && (statesMax === undefined || d.states <= statesMax))) {
      bits |= REJECTED_BY.states;
    }
    if (
      byRate &&
      !(
        d.entropyRateBits !== null &&
        (rateMin === undefined || d.entropyRateBits >= rateMin - 1e-12) &&
        (rateMax === undefined || d.entropyRateBits <= rateMax + 1e-12)
      )
    ) {
      bits |= REJECTED_BY.rate;
    }
    if (hasMinEntropy !== undefined && (d.minEntropyRateBits !== null) !== hasMinEntropy) bits |= REJECTED_BY.minEntropy;
    if (tags !== null) {
      for (const t of tags) {
        if (!d.tagIds.includes(t)) {
          bits |= REJECTED_BY.tags;
          break;
        }
      }
    }
    return bits;
  };
}

function compareNullable(a: number | null, b: number | null, sign: number): number {
  if (a === null && b === null) return 0;
  if (a === null) return 1; // missing figures last in either direction
  if (b === null) return -1;
  return (a - b) * sign;
}

function sorter(sort: SearchSort, dir: "asc" | "desc", hasText: boolean): (a: Candidate, b: Candidate) => number {
  const sign = dir === "asc" ? 1 : -1;
  const byTitle = (a: Candidate, b: Candidate) => a.doc.titleRank - b.doc.titleRank;
  switch (sort) {
    case "title":
      return (a, b) => byTitle(a, b) * sign;
    case "rate":
      return (a, b) => compareNullable(a.doc.entropyRateBits, b.doc.entropyRateBits, sign) || byTitle(a, b);
    case "states":
      return (a, b) => compareNullable(a.doc.states, b.doc.states, sign) || byTitle(a, b);
    case "updated":
      return (a, b) => (a.doc.updatedRank - b.doc.updatedRank) * sign;
    case "relevance":
      // Without query text every score is equal: the most recently updated models come first.
      if (!hasText) return (a, b) => (a.doc.updatedRank - b.doc.updatedRank) * sign;
      return (a, b) => ((a.score ?? 0) - (b.score ?? 0)) * sign || byTitle(a, b);
  }
}

/**
 * The items from `start` to `end` (exclusive) of `items` in the order of `compare`, the same as
 * `items.sort(compare).slice(start, end)` for a total order. Only the first page or few are
 * asked for, so it keeps the `end` best in a binary heap (worst on top): O(n log end) instead of
 * sorting every match. Falls back to a full sort when `end` is a large part of `items`.
 * May reorder `items`.
 */
export function pageOf<T>(items: T[], compare: (a: T, b: T) => number, start: number, end: number): T[] {
  if (start >= items.length || end <= start) return [];
  if (end * 4 >= items.length) return items.sort(compare).slice(start, end);
  const heap: T[] = [];
  // Max-heap under `compare`: heap[0] is the worst of the best `end` so far.
  const up = (i: number) => {
    while (i > 0) {
      const parent = (i - 1) >> 1;
      if (compare(heap[i], heap[parent]) <= 0) break;
      [heap[i], heap[parent]] = [heap[parent], heap[i]];
      i = parent;
    }
  };
  const down = (i: number) => {
    for (;;) {
      const l = 2 * i + 1;
      const r = l + 1;
      let top = i;
      if (l < heap.length && compare(heap[l], heap[top]) > 0) top = l;
      if (r < heap.length && compare(heap[r], heap[top]) > 0) top = r;
      if (top === i) return;
      [heap[i], heap[top]] = [heap[top], heap[i]];
      i = top;
    }
  };
  for (const item of items) {
    if (heap.length < end) {
      heap.push(item);
      up(heap.length - 1);
    } else if (compare(item, heap[0]) < 0) {
      heap[0] = item;
      down(0);
    }
  }
  return heap.sort(compare).slice(start, end);
}

function toRow(c: Candidate): SearchRow {
  const d = c.doc;
  return {
    slug: d.slug,
    title: d.title,
    family: d.family,
    summary: d.summary,
    tags: d.tags,
    latestEdition: d.latestEdition,
    states: d.states,
    entropyRateBits: d.entropyRateBits,
    minEntropyRateBits: d.minEntropyRateBits,
    updatedAt: d.updatedAt,
    score: c.score,
  };
}

/**
 * Searches the library: text matching (fuzzy 0.2, prefix, title boosted), facet filters, sort
 * and paging, with facet counts that reflect the other active filters. Cost: one text search
 * plus a pass over its matches; the index is built on first use and refreshed as described above.
 */
export async function searchLibrary(query: SearchQuery, options: SearchIndexOptions = {}): Promise<SearchResult> {
  return searchIndex(await currentIndex(options), query);
}

/** searchLibrary's work on a given index (tests search an index of the catalogue files with it). */
export function searchIndex(index: BuiltIndex, query: SearchQuery): SearchResult {
  const q = (query.q ?? "").trim();
  const sort: SearchSort = query.sort ?? "relevance";
  const dir = query.dir ?? defaultDirection(sort);
  const pageSize = Math.min(MAX_PAGE_SIZE, Math.max(1, Math.floor(query.pageSize ?? DEFAULT_PAGE_SIZE)));
  const page = Math.max(1, Math.floor(query.page ?? 1));

  const rejected = rejections(query, index);
  const familyCounts = new Int32Array(FAMILIES.length);
  const tagCounts = new Int32Array(index.tagValues.length);
  const rangeCounts = STATE_RANGES.map(() => 0);
  const minEntropy = { with: 0, without: 0 };
  let statesMin: number | null = null;
  let statesMax: number | null = null;
  let rateMin: number | null = null;
  let rateMax: number | null = null;
  const rows: Candidate[] = [];

  for (const c of textMatches(index, q)) {
    const d = c.doc;
    // Which active filters reject this model: none → a result; exactly one → it still counts
    // in that facet (a facet's counts reflect the other filters, not its own).
    const failed = rejected(d);
    if ((failed & (failed - 1)) !== 0) continue; // two or more
    const all = failed === 0;
    if ((all || failed === REJECTED_BY.family) && d.familyIndex >= 0) familyCounts[d.familyIndex]++;
    if ((all || failed === REJECTED_BY.states) && d.states !== null) {
      const n = d.states;
      statesMin = statesMin === null ? n : Math.min(statesMin, n);
      statesMax = statesMax === null ? n : Math.max(statesMax, n);
      for (const i of d.stateRanges) rangeCounts[i]++;
    }
    if ((all || failed === REJECTED_BY.rate) && d.entropyRateBits !== null) {
      rateMin = rateMin === null ? d.entropyRateBits : Math.min(rateMin, d.entropyRateBits);
      rateMax = rateMax === null ? d.entropyRateBits : Math.max(rateMax, d.entropyRateBits);
    }
    if (all || failed === REJECTED_BY.minEntropy) {
      if (d.minEntropyRateBits !== null) minEntropy.with++;
      else minEntropy.without++;
    }
    if (!all) continue;
    // Tags narrow the results (every tag must match), so their counts are over the results.
    for (const id of d.tagIds) tagCounts[id]++;
    rows.push(c);
  }

  const tagFacets: FacetCount[] = [];
  tagCounts.forEach((count, id) => {
    if (count > 0) tagFacets.push({ value: index.tagValues[id], count });
  });

  const start = (page - 1) * pageSize;
  const shown = pageOf(rows, sorter(sort, dir, q !== ""), start, start + pageSize);
  return {
    total: rows.length,
    page,
    pageSize,
    sort,
    dir,
    rows: shown.map(toRow),
    facets: {
      family: FAMILIES.map((value, i) => ({ value, count: familyCounts[i] })),
      tags: tagFacets.sort((a, b) => b.count - a.count || (a.value < b.value ? -1 : a.value > b.value ? 1 : 0)).slice(0, MAX_TAG_FACETS),
      states: { min: statesMin, max: statesMax },
      rate: { min: rateMin, max: rateMax },
      stateRanges: STATE_RANGES.map((r, i) => ({ ...r, count: rangeCounts[i] })),
      minEntropy,
    },
  };
}
