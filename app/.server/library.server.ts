/**
 * Reading the library: models with their latest edition's key figures.
 */
import { desc, eq, sql } from "drizzle-orm";
import { db } from "./db.server";
import { editions, models } from "./schema";

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
