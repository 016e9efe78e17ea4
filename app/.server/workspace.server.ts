/**
 * A contributor's workspace: private items (drafts) with numbered revisions. Every function takes the
 * owner's id and answers only that owner's rows, so another user's item is indistinguishable from a
 * missing one (callers answer 404). Saves are optimistic: the caller names the revision it loaded,
 * and a save against a newer revision is refused (decision note 0008).
 */
import { and, desc, eq, sql } from "drizzle-orm";
import { computeFigures, EngineInputError, parseModel, type Family, type InputIssue, type ModelParams } from "~/engine";
import { citationKey } from "~/citations";
import { db } from "./db.server";
import { getEdition, getLatestEdition } from "./library.server";
import { editions, models, workspaceItems, workspaceRevisions } from "./schema";

export { TITLE_MAX } from "~/workspace-limits";
import { TITLE_MAX } from "~/workspace-limits";
export { NOTES_MAX } from "~/workspace-limits";
import { NOTES_MAX } from "~/workspace-limits";

/** One row of the workspace list. */
export interface WorkspaceListItem {
  id: string;
  title: string;
  family: Family;
  revision: number;
  updatedAt: Date;
  /** `ergoshelf:<slug>@<n>` when cloned from an edition, else null. */
  source: string | null;
  /** The edition's permanent page, e.g. `/library/<slug>/e/<n>`. */
  sourcePath: string | null;
  /** The model the edition belongs to: its title and page. */
  sourceModel: { slug: string; title: string; path: string; edition: number } | null;
}

export interface WorkspaceRevision {
  revision: number;
  title: string;
  createdAt: Date;
}

export interface WorkspaceItem extends WorkspaceListItem {
  notes: string;
  params: ModelParams;
  createdAt: Date;
  revisions: WorkspaceRevision[];
}

/** Why a workspace write was refused; the route turns it into a status and a message by a field. */
export type WorkspaceRefusal =
  | { kind: "invalid"; status: 400; message: string; issues: InputIssue[] }
  | { kind: "stale"; status: 409; message: string; currentRevision: number }
  | { kind: "not-found"; status: 404; message: string };

export type WorkspaceOutcome<T> = { ok: true; value: T } | ({ ok: false } & WorkspaceRefusal);

const notFound = { ok: false, kind: "not-found", status: 404, message: "No such workspace item." } as const;

/** Small valid starting models, set in the Kelpmoor Sound scenario. */
export function defaultModel(family: Family): ModelParams {
  switch (family) {
    case "iid":
      return { family: "iid", alphabet: ["0", "1"], p: [0.52, 0.48] };
    case "markov":
      return {
        family: "markov",
        alphabet: ["calm", "swell", "rough"],
        order: 1,
        P: [
          [0.8, 0.18, 0.02],
          [0.15, 0.7, 0.15],
          [0.05, 0.35, 0.6],
        ],
      };
    case "two-state":
      return { family: "two-state", alphabet: ["clear", "burst"], a: 0.04, b: 0.6 };
    case "graph-walk":
      return {
        family: "graph-walk",
        nodes: ["dock", "aisle-1", "aisle-2", "charger"],
        edges: [
          ["dock", "aisle-1", 3],
          ["dock", "aisle-2", 2],
          ["aisle-1", "aisle-2", 1],
          ["aisle-2", "charger", 1],
        ],
      };
    case "hidden":
      return {
        family: "hidden",
        states: ["quiet", "noisy"],
        alphabet: ["ok", "err"],
        P: [
          [0.95, 0.05],
          [0.3, 0.7],
        ],
        B: [
          [0.99, 0.01],
          [0.6, 0.4],
        ],
      };
  }
}

const listColumns = {
  id: workspaceItems.id,
  title: workspaceItems.title,
  family: workspaceItems.family,
  revision: workspaceItems.revision,
  updatedAt: workspaceItems.updatedAt,
  slug: models.slug,
  modelTitle: models.title,
  editionNumber: editions.number,
};

function withSource<T extends { slug: string | null; modelTitle: string | null; editionNumber: number | null }>(row: T) {
  const { slug, modelTitle, editionNumber, ...rest } = row;
  const cloned = slug !== null && editionNumber !== null;
  return {
    ...rest,
    source: cloned ? citationKey(slug, editionNumber) : null,
    sourcePath: cloned ? `/library/${slug}/e/${editionNumber}` : null,
    sourceModel: cloned ? { slug, title: modelTitle ?? slug, path: `/library/${slug}`, edition: editionNumber } : null,
  };
}

/** The owner's items, most recently updated first. */
export async function listWorkspaceItems(ownerId: string): Promise<WorkspaceListItem[]> {
  const rows = await db()
    .select(listColumns)
    .from(workspaceItems)
    .leftJoin(editions, eq(editions.id, workspaceItems.sourceEditionId))
    .leftJoin(models, eq(models.id, editions.modelId))
    .where(eq(workspaceItems.ownerId, ownerId))
    .orderBy(desc(workspaceItems.updatedAt));
  return rows.map((r) => withSource(r) as WorkspaceListItem);
}

/** One item with its revision list (newest first), or null if it is missing or not the owner's. */
export async function getWorkspaceItem(ownerId: string, id: string): Promise<WorkspaceItem | null> {
  if (!isUuid(id)) return null;
  const [row] = await db()
    .select({ ...listColumns, notes: workspaceItems.notes, params: workspaceItems.params, createdAt: workspaceItems.createdAt })
    .from(workspaceItems)
    .leftJoin(editions, eq(editions.id, workspaceItems.sourceEditionId))
    .leftJoin(models, eq(models.id, editions.modelId))
    .where(and(eq(workspaceItems.id, id), eq(workspaceItems.ownerId, ownerId)))
    .limit(1);
  if (!row) return null;
  const revisions = await db()
    .select({ revision: workspaceRevisions.revision, title: workspaceRevisions.title, createdAt: workspaceRevisions.createdAt })
    .from(workspaceRevisions)
    .where(eq(workspaceRevisions.itemId, id))
    .orderBy(desc(workspaceRevisions.revision));
  return { ...(withSource(row) as WorkspaceListItem), notes: row.notes, params: row.params as ModelParams, createdAt: row.createdAt, revisions };
}

export function isUuid(s: string): boolean {
  return /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(s);
}

async function insertItem(
  ownerId: string,
  values: { title: string; notes: string; family: Family; params: ModelParams; sourceEditionId: string | null },
): Promise<string> {
  return db().transaction(async (tx) => {
    const [item] = await tx
      .insert(workspaceItems)
      .values({ ownerId, ...values, revision: 1 })
      .returning({ id: workspaceItems.id });
    await tx.insert(workspaceRevisions).values({ itemId: item.id, revision: 1, title: values.title, notes: values.notes, params: values.params });
    return item.id;
  });
}

/** A new item of `family` starting from its default model; revision 1. Returns the item id. */
export async function createWorkspaceItem(ownerId: string, family: Family, title: string): Promise<string> {
  return insertItem(ownerId, { title, notes: "", family, params: defaultModel(family), sourceEditionId: null });
}

/** The edition a clone would copy (for the confirmation page), or null. */
export async function findEditionToClone(slug: string, edition: number | null) {
  const record = edition === null ? await getLatestEdition(slug) : await getEdition(slug, edition);
  if (!record) return null;
  return { slug: record.model.slug, number: record.number, title: record.model.title, family: record.model.family, retracted: record.retractedAt !== null, key: citationKey(record.model.slug, record.number) };
}

/** Copies an edition's parameters into a new item titled `title` (default "<model title> (copy)"); null for an unknown edition. */
export async function cloneEditionToWorkspace(ownerId: string, slug: string, edition: number | null, title?: string): Promise<string | null> {
  const record = edition === null ? await getLatestEdition(slug) : await getEdition(slug, edition);
  if (!record) return null;
  const [row] = await db()
    .select({ id: editions.id })
    .from(editions)
    .innerJoin(models, eq(models.id, editions.modelId))
    .where(and(eq(models.slug, record.model.slug), eq(editions.number, record.number)))
    .limit(1);
  if (!row) return null;
  const notes = `Cloned from ${citationKey(record.model.slug, record.number)}.`;
  return insertItem(ownerId, { title: title || `${record.model.title} (copy)`.slice(0, TITLE_MAX), notes, family: record.params.family, params: record.params, sourceEditionId: row.id });
}

/** The server's figures for a saved revision: computed and verified by two routes, or why not. */
export type SavedFigures =
  | { ok: true; entropyRateBits: number | null; minEntropyRateBits: number | null; verified: boolean; checks: number; failedChecks: string[]; message: string | null }
  | { ok: false; message: string };

/** Computes and verifies `params` (already validated) with the engine's defaults; never throws for a model's own faults. */
export function savedFigures(params: ModelParams): SavedFigures {
  try {
    const r = computeFigures({ model: params });
    return {
      ok: true,
      entropyRateBits: r.entropyRate?.bits ?? null,
      minEntropyRateBits: r.minEntropyRate?.bits ?? null,
      verified: r.verification.passed,
      checks: r.verification.checks.length,
      failedChecks: r.verification.checks.filter((c) => !c.passed).map((c) => c.figure),
      message: r.message ?? null,
    };
  } catch (e) {
    if (e instanceof EngineInputError) return { ok: false, message: e.message };
    throw e;
  }
}

/**
 * Saves new parameters, title and notes as the next revision, if `baseRevision` is still the item's
 * revision. The model is validated with parseModel first (nothing is written if it fails); the
 * revision check and both writes happen in one transaction with the item row locked.
 */
export async function saveWorkspaceItem(
  ownerId: string,
  id: string,
  input: { baseRevision: number; title: string; notes: string; params: unknown },
): Promise<WorkspaceOutcome<{ revision: number; figures: SavedFigures }>> {
  if (!isUuid(id)) return notFound;
  const parsed = parseModel(input.params);
  if (!parsed.ok) return { ok: false, kind: "invalid", status: 400, message: parsed.error.message, issues: parsed.error.issues };
  const params = parsed.value;
  const saved = await db().transaction(async (tx): Promise<WorkspaceOutcome<{ revision: number }>> => {
    const [cur] = await tx
      .select({ revision: workspaceItems.revision, family: workspaceItems.family })
      .from(workspaceItems)
      .where(and(eq(workspaceItems.id, id), eq(workspaceItems.ownerId, ownerId)))
      .for("update")
      .limit(1);
    if (!cur) return notFound;
    if (cur.revision !== input.baseRevision) {
      return {
        ok: false,
        kind: "stale",
        status: 409,
        currentRevision: cur.revision,
        message: `This item was saved elsewhere at revision ${cur.revision} after you opened revision ${input.baseRevision}; your changes were not saved and revision ${cur.revision} was not overwritten.`,
      } as const;
    }
    if (params.family !== cur.family) {
      const message = `this item is a ${cur.family} model; its parameters cannot change family to ${params.family}`;
      return { ok: false, kind: "invalid", status: 400, message, issues: [{ path: "family", message }] } as const;
    }
    const revision = cur.revision + 1;
    await tx
      .update(workspaceItems)
      .set({ title: input.title, notes: input.notes, params, revision, updatedAt: sql`now()` })
      .where(eq(workspaceItems.id, id));
    await tx.insert(workspaceRevisions).values({ itemId: id, revision, title: input.title, notes: input.notes, params });
    return { ok: true, value: { revision } } as const;
  });
  // The authoritative figures of what was saved: computed and verified here, after the commit (the
  // row lock is not held while the engine works).
  return saved.ok ? { ok: true, value: { revision: saved.value.revision, figures: savedFigures(params) } } : saved;
}

/** Copies revision `from` into a new revision (the newest); refused like a save if `baseRevision` is stale. */
export async function restoreWorkspaceRevision(
  ownerId: string,
  id: string,
  input: { from: number; baseRevision: number },
): Promise<WorkspaceOutcome<{ revision: number }>> {
  if (!isUuid(id)) return notFound;
  return db().transaction(async (tx) => {
    const [cur] = await tx
      .select({ revision: workspaceItems.revision })
      .from(workspaceItems)
      .where(and(eq(workspaceItems.id, id), eq(workspaceItems.ownerId, ownerId)))
      .for("update")
      .limit(1);
    if (!cur) return notFound;
    if (cur.revision !== input.baseRevision) {
      return {
        ok: false,
        kind: "stale",
        status: 409,
        currentRevision: cur.revision,
        message: `This item was saved elsewhere at revision ${cur.revision}; reload to see it before restoring an older revision.`,
      } as const;
    }
    const [old] = await tx
      .select()
      .from(workspaceRevisions)
      .where(and(eq(workspaceRevisions.itemId, id), eq(workspaceRevisions.revision, input.from)))
      .limit(1);
    if (!old) {
      const message = `there is no revision ${input.from} of this item`;
      return { ok: false, kind: "invalid", status: 400, message, issues: [{ path: "from", message }] } as const;
    }
    const revision = cur.revision + 1;
    await tx
      .update(workspaceItems)
      .set({ title: old.title, notes: old.notes, params: old.params, revision, updatedAt: sql`now()` })
      .where(eq(workspaceItems.id, id));
    await tx.insert(workspaceRevisions).values({ itemId: id, revision, title: old.title, notes: old.notes, params: old.params });
    return { ok: true, value: { revision } } as const;
  });
}

/** Removes the item and (by cascade) its revisions; false if it was not the owner's. */
export async function deleteWorkspaceItem(ownerId: string, id: string): Promise<boolean> {
  if (!isUuid(id)) return false;
  const rows = await db()
    .delete(workspaceItems)
    .where(and(eq(workspaceItems.id, id), eq(workspaceItems.ownerId, ownerId)))
    .returning({ id: workspaceItems.id });
  return rows.length > 0;
}
