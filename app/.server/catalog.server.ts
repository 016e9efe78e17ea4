/**
 * The seed library: reading catalog/*.json, validating each file with the engine's schemas,
 * verifying every edition, and publishing what is new. A file that fails is refused with its
 * name and the reason, and nothing of the run is saved.
 */
import { createHash } from "node:crypto";
import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import canonicalize from "canonicalize";
import { and, eq } from "drizzle-orm";
import { z } from "zod";
import { computeFigures, ENGINE_VERSION, modelParamsSchema, parseModel, type ModelParams } from "~/engine";
import { db } from "./db.server";
import { editions, families, models } from "./schema";

export const catalogEditionSchema = z.object({
  note: z.string().min(1),
  publishedAt: z.iso.date(),
  params: modelParamsSchema,
  retracted: z.object({ reason: z.string().min(1), at: z.iso.date() }).optional(),
});

export const catalogFileSchema = z.object({
  slug: z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "slug must be kebab-case (a-z, 0-9, hyphens)").max(80),
  title: z.string().min(1).max(160),
  family: z.enum(families),
  summary: z.string().min(1).max(2000),
  tags: z.array(z.string().min(1).max(40)).max(20),
  provenance: z.string().max(4000),
  methods: z.array(z.string()).default([]),
  editions: z.array(catalogEditionSchema).min(1),
});
export type CatalogFile = z.infer<typeof catalogFileSchema>;

export class CatalogError extends Error {
  constructor(
    readonly file: string,
    readonly reason: string,
  ) {
    super(`${file}: ${reason}`);
  }
}

/** SHA-256 of the canonical JSON (RFC 8785) of an edition's parameters. */
export function contentHash(params: ModelParams): string {
  return createHash("sha256").update(canonicalize(params) ?? "").digest("hex");
}

export interface PreparedEdition {
  number: number;
  note: string;
  publishedAt: Date;
  params: ModelParams;
  contentHash: string;
  figures: unknown;
  verification: unknown;
  retracted?: { reason: string; at: Date };
}

/** Validates and verifies one catalog file's contents; throws CatalogError naming the problem. */
export function prepareCatalogFile(file: string, raw: unknown): { meta: Omit<CatalogFile, "editions">; editions: PreparedEdition[] } {
  const parsed = catalogFileSchema.safeParse(raw);
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    throw new CatalogError(file, `${first.path.join(".") || "(file)"}: ${first.message}`);
  }
  const { editions: eds, ...meta } = parsed.data;
  const expected = path.basename(file, ".json");
  if (meta.slug !== expected) throw new CatalogError(file, `slug "${meta.slug}" does not match the file name "${expected}.json"`);
  const prepared = eds.map((ed, i) => {
    const where = `edition ${i + 1}`;
    if (ed.params.family !== meta.family) {
      throw new CatalogError(file, `${where}: params.family is "${ed.params.family}" but the model's family is "${meta.family}"`);
    }
    const checked = parseModel(ed.params);
    if (!checked.ok) {
      const issue = checked.error.issues[0];
      throw new CatalogError(file, `${where}: ${issue ? `${issue.path}: ${issue.message}` : checked.error.message}`);
    }
    let figures;
    try {
      figures = computeFigures({ model: checked.value });
    } catch (error) {
      throw new CatalogError(file, `${where}: ${error instanceof Error ? error.message : String(error)}`);
    }
    if (!figures.verification.passed) {
      const failing = figures.verification.checks.filter((c: { passed: boolean }) => !c.passed).map((c: { figure: string }) => c.figure);
      throw new CatalogError(file, `${where}: verification failed for ${failing.join(", ")}`);
    }
    return {
      number: i + 1,
      note: ed.note,
      publishedAt: new Date(`${ed.publishedAt}T12:00:00Z`),
      params: checked.value,
      contentHash: contentHash(checked.value),
      figures,
      verification: figures.verification,
      retracted: ed.retracted ? { reason: ed.retracted.reason, at: new Date(`${ed.retracted.at}T12:00:00Z`) } : undefined,
    };
  });
  return { meta, editions: prepared };
}

/** Reads and prepares every catalog file in a folder (sorted by name). */
export async function loadCatalog(dir: string) {
  // schema.json is the JSON Schema of the format, not a model.
  const names = (await readdir(dir)).filter((n) => n.endsWith(".json") && n !== "schema.json").sort();
  const out = [];
  const slugs = new Set<string>();
  for (const name of names) {
    let raw: unknown;
    try {
      raw = JSON.parse(await readFile(path.join(dir, name), "utf8"));
    } catch (error) {
      throw new CatalogError(name, `not valid JSON (${error instanceof Error ? error.message : String(error)})`);
    }
    const prepared = prepareCatalogFile(name, raw);
    if (slugs.has(prepared.meta.slug)) throw new CatalogError(name, `duplicate slug "${prepared.meta.slug}"`);
    slugs.add(prepared.meta.slug);
    out.push(prepared);
  }
  return out;
}

/**
 * Publishes the catalog into the database in one transaction: new models and new editions are
 * inserted; an existing edition whose parameters changed in the file is refused (editions are
 * immutable: add a new edition instead). Returns what was added.
 */
export async function seedCatalog(dir: string) {
  const catalog = await loadCatalog(dir);
  let addedModels = 0;
  let addedEditions = 0;
  await db().transaction(async (tx) => {
    for (const entry of catalog) {
      const { meta } = entry;
      let [model] = await tx.select().from(models).where(eq(models.slug, meta.slug));
      if (!model) {
        [model] = await tx
          .insert(models)
          .values({ slug: meta.slug, title: meta.title, family: meta.family, summary: meta.summary, tags: meta.tags, provenance: meta.provenance, methods: meta.methods })
          .returning();
        addedModels++;
      } else {
        await tx
          .update(models)
          .set({ title: meta.title, summary: meta.summary, tags: meta.tags, provenance: meta.provenance, methods: meta.methods })
          .where(eq(models.id, model.id));
      }
      for (const ed of entry.editions) {
        const [existing] = await tx
          .select({ contentHash: editions.contentHash, retractedAt: editions.retractedAt })
          .from(editions)
          .where(and(eq(editions.modelId, model.id), eq(editions.number, ed.number)));
        if (existing) {
          if (existing.contentHash !== ed.contentHash) {
            throw new CatalogError(`${meta.slug}.json`, `edition ${ed.number} is already published with other parameters; editions are immutable, add a new edition instead`);
          }
          if (ed.retracted && !existing.retractedAt) {
            await tx
              .update(editions)
              .set({ retractedAt: ed.retracted.at, retractionReason: ed.retracted.reason })
              .where(and(eq(editions.modelId, model.id), eq(editions.number, ed.number)));
          }
          continue;
        }
        await tx.insert(editions).values({
          modelId: model.id,
          number: ed.number,
          params: ed.params,
          contentHash: ed.contentHash,
          figures: ed.figures,
          verification: ed.verification,
          engineVersion: ENGINE_VERSION,
          note: ed.note,
          publishedAt: ed.publishedAt,
        });
        if (ed.retracted) {
          await tx
            .update(editions)
            .set({ retractedAt: ed.retracted.at, retractionReason: ed.retracted.reason })
            .where(and(eq(editions.modelId, model.id), eq(editions.number, ed.number)));
        }
        addedEditions++;
        await tx.update(models).set({ updatedAt: ed.publishedAt }).where(eq(models.id, model.id));
      }
    }
  });
  return { models: catalog.length, addedModels, addedEditions };
}
