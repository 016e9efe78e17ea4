/**
 * Reading the library: models with their latest edition's key figures.
 */
import { and, asc, desc, eq, sql } from "drizzle-orm";
import { citationKey } from "~/citations";
import type { ComputeResult, Family, ModelParams, VerificationRecord } from "~/engine";
import { toSearchParams, type SearchQuery } from "~/search-params";
import { db } from "./db.server";
import { searchLibrary } from "./search.server";
import { editions, models } from "./schema";

export interface ModelSummary {
  id: string;
  slug: string;
  title: string;
  family: Family;
  summary: string;
  tags: string[];
  provenance: string;
  methods: string[];
  createdAt: Date;
  updatedAt: Date;
}

export interface EditionSummary {
  number: number;
  note: string;
  publishedAt: Date;
  retractedAt: Date | null;
  retractionReason: string | null;
  contentHash: string;
  entropyRateBits: number | null;
  minEntropyRateBits: number | null;
}

export interface EditionRecord extends EditionSummary {
  model: ModelSummary;
  params: ModelParams;
  figures: ComputeResult;
  verification: VerificationRecord;
  engineVersion: string;
  latestNumber: number;
  latestUnretractedNumber: number | null;
}

const modelColumns = {
  id: models.id,
  slug: models.slug,
  title: models.title,
  family: models.family,
  summary: models.summary,
  tags: models.tags,
  provenance: models.provenance,
  methods: models.methods,
  createdAt: models.createdAt,
  updatedAt: models.updatedAt,
};

/** The rate figures stored with an edition, read defensively (older rows may lack a field). */
function rateBits(figures: unknown, key: "entropyRate" | "minEntropyRate"): number | null {
  const f = (figures ?? {}) as Record<string, { bits?: unknown } | null | undefined>;
  const bits = f[key]?.bits;
  return typeof bits === "number" && Number.isFinite(bits) ? bits : null;
}

/**
 * Whom a read is for. Synthetic scale-test models (models.is_synthetic, from
 * `npm run seed:synthetic`) are not part of the library: every read below answers as if they did
 * not exist unless the caller is server code that asks for them (the benchmark); no request
 * parameter sets this.
 */
export interface LibraryReadOptions {
  includeSynthetic?: boolean;
}

async function findModel(slug: string, options: LibraryReadOptions = {}): Promise<ModelSummary | null> {
  const bySlug = eq(models.slug, slug);
  const [row] = await db()
    .select(modelColumns)
    .from(models)
    .where(options.includeSynthetic ? bySlug : and(bySlug, eq(models.isSynthetic, false)))
    .limit(1);
  return row ?? null;
}

/** A model and its edition list (oldest first), or null for an unknown slug (or a synthetic model). */
export async function getModelWithEditions(
  slug: string,
  options: LibraryReadOptions = {},
): Promise<{ model: ModelSummary; editions: EditionSummary[] } | null> {
  const model = await findModel(slug, options);
  if (!model) return null;
  const rows = await db()
    .select({
      number: editions.number,
      note: editions.note,
      publishedAt: editions.publishedAt,
      retractedAt: editions.retractedAt,
      retractionReason: editions.retractionReason,
      contentHash: editions.contentHash,
      entropyRateBits: sql<number | null>`(${editions.figures} -> 'entropyRate' ->> 'bits')::float8`,
      minEntropyRateBits: sql<number | null>`(${editions.figures} -> 'minEntropyRate' ->> 'bits')::float8`,
    })
    .from(editions)
    .where(eq(editions.modelId, model.id))
    .orderBy(asc(editions.number));
  return {
    model,
    editions: rows.map((r) => ({
      ...r,
      entropyRateBits: r.entropyRateBits === null ? null : Number(r.entropyRateBits),
      minEntropyRateBits: r.minEntropyRateBits === null ? null : Number(r.minEntropyRateBits),
    })),
  };
}

async function loadEdition(model: ModelSummary, number: number): Promise<EditionRecord | null> {
  const [row] = await db()
    .select({
      number: editions.number,
      note: editions.note,
      publishedAt: editions.publishedAt,
      retractedAt: editions.retractedAt,
      retractionReason: editions.retractionReason,
      contentHash: editions.contentHash,
      params: editions.params,
      figures: editions.figures,
      verification: editions.verification,
      engineVersion: editions.engineVersion,
      latestNumber: sql<number>`(select max(e2.number) from ${editions} e2 where e2.model_id = ${model.id})::int`,
      latestUnretractedNumber: sql<
        number | null
      >`(select max(e3.number) from ${editions} e3 where e3.model_id = ${model.id} and e3.retracted_at is null)::int`,
    })
    .from(editions)
    .where(and(eq(editions.modelId, model.id), eq(editions.number, number)))
    .limit(1);
  if (!row) return null;
  return {
    model,
    number: row.number,
    note: row.note,
    publishedAt: row.publishedAt,
    retractedAt: row.retractedAt,
    retractionReason: row.retractionReason,
    contentHash: row.contentHash,
    entropyRateBits: rateBits(row.figures, "entropyRate"),
    minEntropyRateBits: rateBits(row.figures, "minEntropyRate"),
    params: row.params as ModelParams,
    figures: row.figures as ComputeResult,
    verification: row.verification as VerificationRecord,
    engineVersion: row.engineVersion,
    latestNumber: Number(row.latestNumber),
    latestUnretractedNumber: row.latestUnretractedNumber === null ? null : Number(row.latestUnretractedNumber),
  };
}

/** Edition numbers are PostgreSQL integers; a larger number cannot name an edition. */
const MAX_EDITION_NUMBER = 2_147_483_647;

/** One edition of a model, or null for an unknown slug or number (or a synthetic model). */
export async function getEdition(slug: string, number: number, options: LibraryReadOptions = {}): Promise<EditionRecord | null> {
  if (!Number.isSafeInteger(number) || number < 1 || number > MAX_EDITION_NUMBER) return null;
  const model = await findModel(slug, options);
  if (!model) return null;
  return loadEdition(model, number);
}

/** The newest edition that is not retracted, else the newest; null for an unknown slug (or a synthetic model). */
export async function getLatestEdition(slug: string, options: LibraryReadOptions = {}): Promise<EditionRecord | null> {
  const model = await findModel(slug, options);
  if (!model) return null;
  const [row] = await db()
    .select({ number: editions.number })
    .from(editions)
    .where(eq(editions.modelId, model.id))
    .orderBy(sql`(${editions.retractedAt} is null) desc`, desc(editions.number))
    .limit(1);
  if (!row) return null;
  return loadEdition(model, row.number);
}

export interface LibraryRow {
  slug: string;
  title: string;
  family: string;
  summary: string;
  tags: string[];
  latestEdition: number;
  states: number | null;
  entropyRateBits: number | null;
  minEntropyRateBits: number | null;
  updatedAt: Date;
}

/** Every model with its latest edition's figures, most recently updated first. */
export async function listLibrary(limit = 500): Promise<LibraryRow[]> {
  const rows = await db()
    .selectDistinctOn([models.id], {
      slug: models.slug,
      title: models.title,
      family: models.family,
      summary: models.summary,
      tags: models.tags,
      updatedAt: models.updatedAt,
      latestEdition: editions.number,
      figures: editions.figures,
    })
    .from(models)
    .innerJoin(editions, eq(editions.modelId, models.id))
    .where(eq(models.isSynthetic, false))
    // The latest edition: the newest that is not retracted, else the newest (as getLatestEdition).
    .orderBy(models.id, sql`(${editions.retractedAt} is null) desc`, desc(editions.number));
  rows.sort((a, b) => b.updatedAt.getTime() - a.updatedAt.getTime() || a.title.localeCompare(b.title));
  return rows.slice(0, limit).map((r) => {
    const f = (r.figures ?? {}) as { entropyRate?: { bits?: number } | null; minEntropyRate?: { bits?: number } | null; states?: unknown[] };
    return {
      slug: r.slug,
      title: r.title,
      family: r.family,
      summary: r.summary,
      tags: r.tags,
      latestEdition: r.latestEdition,
      states: Array.isArray(f.states) ? f.states.length : null,
      entropyRateBits: typeof f.entropyRate?.bits === "number" ? f.entropyRate.bits : null,
      minEntropyRateBits: typeof f.minEntropyRate?.bits === "number" ? f.minEntropyRate.bits : null,
      updatedAt: r.updatedAt,
    };
  });
}

/** Counts for the front page. */
export async function libraryStats() {
  const [row] = await db()
    .select({
      models: sql<number>`(select count(*) from ${models} where not ${models.isSynthetic})::int`,
      editions: sql<number>`(select count(*) from ${editions} e join ${models} m on m.id = e.model_id where not m.is_synthetic)::int`,
    })
    .from(sql`(select 1) as one`);
  return row ?? { models: 0, editions: 0 };
}

// ---------------------------------------------------------------------------------------------
// The read-only library API (GET /api/v1/models…): JSON shapes and cache validators.

/** The permanent URL path of an edition. */
export function editionPath(slug: string, number: number): string {
  return `/library/${encodeURIComponent(slug)}/e/${number}`;
}

/** The API path of an edition. */
export function editionApiPath(slug: string, number: number): string {
  return `/api/v1/models/${encodeURIComponent(slug)}/editions/${number}`;
}

/** A model as the API shows it (the internal id stays inside). */
export function modelJson(model: ModelSummary) {
  return {
    slug: model.slug,
    title: model.title,
    family: model.family,
    summary: model.summary,
    tags: model.tags,
    provenance: model.provenance,
    methods: model.methods,
    createdAt: model.createdAt.toISOString(),
    updatedAt: model.updatedAt.toISOString(),
  };
}

function retractionJson(e: { retractedAt: Date | null; retractionReason: string | null }) {
  return e.retractedAt ? { at: e.retractedAt.toISOString(), reason: e.retractionReason ?? "" } : null;
}

/** GET /api/v1/models/:slug: the model, its editions (oldest first) and links. */
export function modelResource(found: { model: ModelSummary; editions: EditionSummary[] }) {
  const { model, editions: list } = found;
  const latest = [...list].reverse().find((e) => !e.retractedAt) ?? list[list.length - 1];
  return {
    model: modelJson(model),
    latestEdition: latest ? latest.number : null,
    editions: list.map((e) => ({
      number: e.number,
      note: e.note,
      publishedAt: e.publishedAt.toISOString(),
      retraction: retractionJson(e),
      contentHash: e.contentHash,
      entropyRateBits: e.entropyRateBits,
      minEntropyRateBits: e.minEntropyRateBits,
      citationKey: citationKey(model.slug, e.number),
      links: { self: editionApiPath(model.slug, e.number), html: editionPath(model.slug, e.number) },
    })),
    links: {
      self: `/api/v1/models/${encodeURIComponent(model.slug)}`,
      html: `/library/${encodeURIComponent(model.slug)}`,
      latest: latest ? editionApiPath(model.slug, latest.number) : null,
    },
  };
}

/**
 * GET /api/v1/models/:slug/editions/:n. Everything here is fixed once the edition is published
 * except the retraction, which the ETag carries; which edition is newest is on the model resource.
 */
export function editionResource(record: EditionRecord) {
  const { model } = record;
  return {
    model: { slug: model.slug, title: model.title, family: model.family },
    number: record.number,
    note: record.note,
    publishedAt: record.publishedAt.toISOString(),
    retraction: retractionJson(record),
    citationKey: citationKey(model.slug, record.number),
    url: editionPath(model.slug, record.number),
    contentHash: record.contentHash,
    engineVersion: record.engineVersion,
    params: record.params,
    figures: record.figures,
    verification: record.verification,
    links: {
      self: editionApiPath(model.slug, record.number),
      html: editionPath(model.slug, record.number),
      model: `/api/v1/models/${encodeURIComponent(model.slug)}`,
      bibtex: `${editionPath(model.slug, record.number)}/cite.bib`,
      ris: `${editionPath(model.slug, record.number)}/cite.ris`,
      csl: `${editionPath(model.slug, record.number)}/cite.json`,
    },
  };
}

/** The strong validator of an edition resource: its content hash and whether it is retracted. */
export function editionETag(record: Pick<EditionSummary, "contentHash" | "retractedAt">): string {
  return `"${record.contentHash}-${record.retractedAt ? "retracted" : "standing"}"`;
}

/** Whether an If-None-Match header names this ETag (a list, weak forms and `*` included). */
export function ifNoneMatchHits(header: string | null, etag: string): boolean {
  if (!header) return false;
  const bare = etag.replace(/^W\//, "");
  return header.split(",").some((part) => {
    const tag = part.trim();
    return tag === "*" || tag.replace(/^W\//, "") === bare;
  });
}

/**
 * GET /api/v1/models: one page of models under the search parameters, each with its links, and
 * links to the neighbouring pages.
 */
export async function listModelsPage(query: SearchQuery) {
  const result = await searchLibrary(query);
  const pages = Math.max(1, Math.ceil(result.total / result.pageSize));
  const pageLink = (page: number) => {
    const qs = toSearchParams({ ...query, page }).toString();
    return `/api/v1/models${qs ? `?${qs}` : ""}`;
  };
  return {
    total: result.total,
    page: result.page,
    pageSize: result.pageSize,
    pages,
    sort: result.sort,
    dir: result.dir,
    models: result.rows.map((r) => ({
      slug: r.slug,
      title: r.title,
      family: r.family,
      summary: r.summary,
      tags: r.tags,
      latestEdition: r.latestEdition,
      states: r.states,
      entropyRateBits: r.entropyRateBits,
      minEntropyRateBits: r.minEntropyRateBits,
      updatedAt: r.updatedAt.toISOString(),
      score: r.score,
      citationKey: citationKey(r.slug, r.latestEdition),
      links: {
        self: `/api/v1/models/${encodeURIComponent(r.slug)}`,
        html: `/library/${encodeURIComponent(r.slug)}`,
        latest: editionApiPath(r.slug, r.latestEdition),
      },
    })),
    links: {
      self: pageLink(result.page),
      first: pageLink(1),
      prev: result.page > 1 ? pageLink(Math.min(result.page - 1, pages)) : null,
      next: result.page < pages ? pageLink(result.page + 1) : null,
    },
  };
}
