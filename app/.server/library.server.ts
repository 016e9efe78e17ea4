/**
 * Reading the library: models with their latest edition's key figures.
 */
import { and, asc, desc, eq, sql } from "drizzle-orm";
import type { ComputeResult, Family, ModelParams, VerificationRecord } from "~/engine";
import { db } from "./db.server";
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

async function findModel(slug: string): Promise<ModelSummary | null> {
  const [row] = await db().select(modelColumns).from(models).where(eq(models.slug, slug)).limit(1);
  return row ?? null;
}

/** A model and its edition list (oldest first), or null for an unknown slug. */
export async function getModelWithEditions(
  slug: string,
): Promise<{ model: ModelSummary; editions: EditionSummary[] } | null> {
  const model = await findModel(slug);
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

/** One edition of a model, or null for an unknown slug or number. */
export async function getEdition(slug: string, number: number): Promise<EditionRecord | null> {
  if (!Number.isSafeInteger(number) || number < 1) return null;
  const model = await findModel(slug);
  if (!model) return null;
  return loadEdition(model, number);
}

/** The newest edition that is not retracted, else the newest; null for an unknown slug. */
export async function getLatestEdition(slug: string): Promise<EditionRecord | null> {
  const model = await findModel(slug);
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

/** Every model with its newest edition's figures, newest first. */
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
    .orderBy(models.id, desc(editions.number));
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
      editions: sql<number>`(select count(*) from ${editions})::int`,
    })
    .from(sql`(select 1) as one`);
  return row ?? { models: 0, editions: 0 };
}
