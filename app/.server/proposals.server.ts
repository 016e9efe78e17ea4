/**
 * Proposals and their review: a contributor submits a workspace item as a new model or as a new
 * edition of the model it was cloned from; curators ask for changes, decline, or accept, which
 * publishes an edition. Every transition locks the proposal row, checks who may make it and from
 * which state, records it in the thread and the audit log in the same transaction, and sends its
 * mail after the commit. See docs/decisions/0010-proposals.md.
 */
import { and, asc, desc, eq, inArray, max, ne, sql } from "drizzle-orm";
import { citationKey } from "~/citations";
import { computeFigures, ENGINE_VERSION, EngineInputError, parseModel, type ComputeResult, type InputIssue, type ModelParams } from "~/engine";
import type { VerificationRecord } from "~/engine/verification";
import { hasRole, type SessionUser } from "~/permissions";
import { openProposalStates, type Decision, type ProposalKind, type ProposalState, type SubmitForm } from "~/proposal-forms";
import { recordAudit } from "./audit.server";
import { contentHash } from "./catalog.server";
import { db } from "./db.server";
import { getLatestEdition } from "./library.server";
import { changesRequestedMail, curatorAddresses, newCommentMail, proposalAcceptedMail, proposalDeclinedMail, proposalSubmittedMail, sendMail, type MailContent } from "./mail.server";
import { editions, models, proposals, reviewComments, users, workspaceItems } from "./schema";
import { invalidateSearchIndex } from "./search.server";
import { getWorkspaceItem } from "./workspace.server";

/** What a proposal freezes at submission (and again at each resubmission). */
export interface ProposalSnapshot {
  params: ModelParams;
  figures: ComputeResult;
  /** The workspace item's revision the snapshot was taken from. */
  revision: number;
  /** For a new model: what the library page will show beside the figures. */
  model: { summary: string; tags: string[]; provenance: string } | null;
  /** The edition the item was cloned from, if any. */
  basedOn: { slug: string; edition: number } | null;
}

export type ProposalRefusal = {
  ok: false;
  status: 400 | 403 | 404 | 409;
  message: string;
  issues: InputIssue[];
};
export type ProposalOutcome<T> = { ok: true; value: T } | ProposalRefusal;

function refuse(status: ProposalRefusal["status"], message: string, issues: InputIssue[] = []): ProposalRefusal {
  return { ok: false, status, message, issues };
}

/** Thrown inside a transaction to roll it back and answer with the refusal. */
class Refused extends Error {
  constructor(readonly refusal: ProposalRefusal) {
    super(refusal.message);
  }
}

const NOT_FOUND = "There is no such proposal.";

function isOpen(state: ProposalState): boolean {
  return openProposalStates.includes(state);
}

/** Figures of a snapshot, or the engine's own words for why they cannot be computed or verified. */
function verifiedFigures(params: unknown): { ok: true; params: ModelParams; figures: ComputeResult } | ProposalRefusal {
  const parsed = parseModel(params);
  if (!parsed.ok) return refuse(400, parsed.error.message, parsed.error.issues);
  let figures: ComputeResult;
  try {
    figures = computeFigures({ model: parsed.value });
  } catch (error) {
    if (error instanceof EngineInputError) return refuse(400, error.message, error.issues);
    throw error;
  }
  if (!figures.verification.passed) {
    const failing = figures.verification.checks.filter((c) => !c.passed).map((c) => c.figure);
    return refuse(409, `The figures failed verification (${failing.join(", ")}), so this cannot be published. Adjust the parameters and try again.`);
  }
  return { ok: true, params: parsed.value, figures };
}

async function mailTo(to: string[], content: MailContent): Promise<void> {
  if (to.length) await sendMail({ to, ...content });
}

async function curatorsExcept(email: string): Promise<string[]> {
  return (await curatorAddresses()).filter((a) => a.toLowerCase() !== email.toLowerCase());
}

// ---------------------------------------------------------------------------------------------
// Reading

export interface ProposalListRow {
  id: string;
  title: string;
  kind: ProposalKind;
  family: ModelParams["family"];
  state: ProposalState;
  authorName: string;
  authorId: string;
  /** The model's slug: the target of a new edition, or the slug a new model asks for. */
  slug: string | null;
  createdAt: Date;
  updatedAt: Date;
  comments: number;
}

const listColumns = {
  id: proposals.id,
  title: proposals.title,
  kind: proposals.kind,
  family: proposals.family,
  state: proposals.state,
  authorName: users.name,
  authorId: proposals.authorId,
  targetSlug: models.slug,
  proposedSlug: proposals.proposedSlug,
  createdAt: proposals.createdAt,
  updatedAt: proposals.updatedAt,
  comments: sql<number>`(select count(*)::int from ${reviewComments} where ${reviewComments.proposalId} = ${proposals.id} and ${reviewComments.kind} = 'comment')`,
};

function listRow(r: { targetSlug: string | null; proposedSlug: string | null } & Omit<ProposalListRow, "slug">): ProposalListRow {
  const { targetSlug, proposedSlug, ...rest } = r;
  return { ...rest, slug: targetSlug ?? proposedSlug };
}

/** Every proposal for the review queue (open ones first, then the newest), at most `limit`. */
export async function listReviewQueue(limit = 1000): Promise<ProposalListRow[]> {
  const rows = await db()
    .select(listColumns)
    .from(proposals)
    .innerJoin(users, eq(users.id, proposals.authorId))
    .leftJoin(models, eq(models.id, proposals.targetModelId))
    .orderBy(sql`(${proposals.state} in ('submitted', 'resubmitted', 'changes-requested')) desc`, asc(proposals.createdAt))
    .limit(limit);
  return rows.map(listRow);
}

/** An author's own proposals, newest first. */
export async function listAuthorProposals(authorId: string): Promise<ProposalListRow[]> {
  const rows = await db()
    .select(listColumns)
    .from(proposals)
    .innerJoin(users, eq(users.id, proposals.authorId))
    .leftJoin(models, eq(models.id, proposals.targetModelId))
    .where(eq(proposals.authorId, authorId))
    .orderBy(desc(proposals.updatedAt));
  return rows.map(listRow);
}

export interface ThreadEntry {
  id: number;
  kind: "comment" | "submitted" | "resubmitted" | "changes-requested" | "accepted" | "declined" | "withdrawn";
  body: string;
  authorName: string;
  authorIsAuthor: boolean;
  createdAt: Date;
}

export interface ProposalView {
  id: string;
  kind: ProposalKind;
  state: ProposalState;
  title: string;
  family: ModelParams["family"];
  changeNote: string;
  createdAt: Date;
  updatedAt: Date;
  author: { id: string; name: string };
  /** The model a new edition is for. */
  target: { slug: string; title: string } | null;
  proposedSlug: string | null;
  snapshot: ProposalSnapshot;
  /** The edition the proposal is compared with: the target model's current edition. */
  current: {
    number: number;
    params: ModelParams;
    figures: ComputeResult;
    verification: VerificationRecord;
  } | null;
  published: { slug: string; number: number; citationKey: string } | null;
  decidedBy: string | null;
  /** The workspace item, while it exists, and whether it was saved since the snapshot. */
  item: { id: string; revision: number; changedSinceSnapshot: boolean } | null;
  thread: ThreadEntry[];
}

async function loadView(id: string): Promise<ProposalView | null> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return null;
  const [row] = await db()
    .select({
      p: proposals,
      authorName: users.name,
      targetSlug: models.slug,
      targetTitle: models.title,
      itemRevision: workspaceItems.revision,
    })
    .from(proposals)
    .innerJoin(users, eq(users.id, proposals.authorId))
    .leftJoin(models, eq(models.id, proposals.targetModelId))
    .leftJoin(workspaceItems, eq(workspaceItems.id, proposals.itemId))
    .where(eq(proposals.id, id));
  if (!row) return null;
  const p = row.p;
  const snapshot = p.snapshot as ProposalSnapshot;
  const thread = await db()
    .select({
      id: reviewComments.id,
      kind: reviewComments.kind,
      body: reviewComments.body,
      authorName: users.name,
      authorId: reviewComments.authorId,
      createdAt: reviewComments.createdAt,
    })
    .from(reviewComments)
    .innerJoin(users, eq(users.id, reviewComments.authorId))
    .where(eq(reviewComments.proposalId, id))
    .orderBy(asc(reviewComments.createdAt), asc(reviewComments.id));

  let current: ProposalView["current"] = null;
  let published: ProposalView["published"] = null;
  if (p.publishedEditionId) {
    const [ed] = await db().select({ number: editions.number, slug: models.slug }).from(editions).innerJoin(models, eq(models.id, editions.modelId)).where(eq(editions.id, p.publishedEditionId));
    if (ed)
      published = {
        slug: ed.slug,
        number: ed.number,
        citationKey: citationKey(ed.slug, ed.number),
      };
  }
  if (row.targetSlug) {
    const latest = await getLatestEdition(row.targetSlug);
    // Once accepted, compare with the edition it superseded rather than with itself.
    const compareWith = published && latest?.number === published.number && published.number > 1 ? null : latest;
    if (compareWith)
      current = {
        number: compareWith.number,
        params: compareWith.params,
        figures: compareWith.figures,
        verification: compareWith.verification,
      };
  }
  let decidedBy: string | null = null;
  if (p.decidedBy) {
    const [u] = await db().select({ name: users.name }).from(users).where(eq(users.id, p.decidedBy));
    decidedBy = u?.name ?? null;
  }
  return {
    id: p.id,
    kind: p.kind,
    state: p.state,
    title: p.title,
    family: p.family,
    changeNote: p.changeNote,
    createdAt: p.createdAt,
    updatedAt: p.updatedAt,
    author: { id: p.authorId, name: row.authorName },
    target: row.targetSlug && row.targetTitle ? { slug: row.targetSlug, title: row.targetTitle } : null,
    proposedSlug: p.proposedSlug,
    snapshot,
    current,
    published,
    decidedBy,
    item:
      p.itemId && row.itemRevision !== null
        ? {
            id: p.itemId,
            revision: row.itemRevision,
            changedSinceSnapshot: row.itemRevision !== snapshot.revision,
          }
        : null,
    thread: thread.map((t) => ({
      ...t,
      kind: t.kind as ThreadEntry["kind"],
      authorIsAuthor: t.authorId === p.authorId,
    })),
  };
}

/** A proposal as its author sees it; null when it is not theirs (indistinguishable from missing). */
export async function getProposalForAuthor(authorId: string, id: string): Promise<ProposalView | null> {
  const view = await loadView(id);
  return view && view.author.id === authorId ? view : null;
}

/** A proposal as a curator sees it (any proposal). The caller has checked the role. */
export async function getProposalForReview(id: string): Promise<ProposalView | null> {
  return loadView(id);
}

/** The open proposal of a workspace item, if there is one. */
export async function openProposalOfItem(itemId: string): Promise<{ id: string; state: ProposalState } | null> {
  const [row] = await db()
    .select({ id: proposals.id, state: proposals.state })
    .from(proposals)
    .where(and(eq(proposals.itemId, itemId), inArray(proposals.state, [...openProposalStates])))
    .limit(1);
  return row ?? null;
}

// ---------------------------------------------------------------------------------------------
// The author's actions

/** Submits the owner's workspace item (as saved) for review; `mail: false` (the demo seed) sends no notice to curators. */
export async function submitProposal(user: SessionUser, itemId: string, form: SubmitForm, opts: { mail?: boolean } = {}): Promise<ProposalOutcome<{ id: string }>> {
  const item = await getWorkspaceItem(user.id, itemId);
  if (!item) return refuse(404, "There is no such item in your workspace.");
  const open = await openProposalOfItem(itemId);
  if (open) return refuse(409, "This item already has an open proposal; follow it up there (resubmit or withdraw it) instead of submitting again.");

  const checked = verifiedFigures(item.params);
  if (!checked.ok) return checked;

  const basedOn = item.source ? parseKey(item.source) : null;
  let targetModelId: string | null = null;
  let proposedSlug: string | null = null;
  let title = item.title;
  let modelMeta: ProposalSnapshot["model"] = null;

  if (form.kind === "new-edition") {
    if (!basedOn) return refuse(400, "This item was not cloned from a library edition, so it can only be proposed as a new model.", [{ path: "kind", message: "choose “new model”" }]);
    const latest = await getLatestEdition(basedOn.slug);
    if (!latest) return refuse(409, `The model ${basedOn.slug} is no longer in the library.`);
    if (latest.model.family !== checked.params.family) {
      return refuse(400, `The model ${basedOn.slug} is a ${latest.model.family} model; a new edition must keep the family.`, [{ path: "kind", message: "a new edition keeps the model's family" }]);
    }
    if (latest.contentHash === contentHash(checked.params)) {
      return refuse(400, `The parameters are the same as edition ${latest.number} of ${basedOn.slug}; change something before proposing a new edition.`, [
        { path: "params", message: "no change from the current edition" },
      ]);
    }
    targetModelId = latest.model.id;
    title = latest.model.title;
  } else {
    const [taken] = await db().select({ id: models.id }).from(models).where(eq(models.slug, form.slug));
    if (taken) return refuse(400, `The slug “${form.slug}” is already used by a library model; choose another.`, [{ path: "slug", message: "this slug is taken" }]);
    const [pending] = await db()
      .select({ id: proposals.id })
      .from(proposals)
      .where(and(eq(proposals.proposedSlug, form.slug), inArray(proposals.state, [...openProposalStates])));
    if (pending)
      return refuse(400, `Another open proposal asks for the slug “${form.slug}”; choose another.`, [
        {
          path: "slug",
          message: "this slug is asked for by another proposal",
        },
      ]);
    proposedSlug = form.slug;
    title = form.title;
    modelMeta = {
      summary: form.summary,
      tags: form.tags,
      provenance: form.provenance,
    };
  }

  const snapshot: ProposalSnapshot = {
    params: checked.params,
    figures: checked.figures,
    revision: item.revision,
    model: modelMeta,
    basedOn,
  };
  let id: string;
  try {
    id = await db().transaction(async (tx) => {
      const [row] = await tx
        .insert(proposals)
        .values({
          itemId,
          authorId: user.id,
          kind: form.kind,
          targetModelId,
          proposedSlug,
          title,
          family: checked.params.family,
          snapshot,
          changeNote: form.changeNote,
        })
        .returning({ id: proposals.id });
      await tx.insert(reviewComments).values({
        proposalId: row.id,
        authorId: user.id,
        kind: "submitted",
        body: form.changeNote,
      });
      await recordAudit(
        {
          actorId: user.id,
          action: "proposal.submit",
          target: row.id,
          details: {
            kind: form.kind,
            slug: basedOn?.slug ?? proposedSlug,
            revision: item.revision,
          },
        },
        tx,
      );
      return row.id;
    });
  } catch (error) {
    // The checks above ran outside the transaction; the partial unique indexes settle a race.
    const constraint = uniqueViolation(error);
    if (constraint === "proposals_one_open_per_item") return refuse(409, "This item already has an open proposal; follow it up there (resubmit or withdraw it) instead of submitting again.");
    if (constraint === "proposals_one_open_per_slug")
      return refuse(400, `Another open proposal asks for the slug “${proposedSlug}”; choose another.`, [
        {
          path: "slug",
          message: "this slug is asked for by another proposal",
        },
      ]);
    throw error;
  }
  if (opts.mail === false) return { ok: true, value: { id } };
  await mailTo(
    await curatorsExcept(user.email),
    proposalSubmittedMail({
      proposalId: id,
      title,
      authorName: user.name,
      kind: form.kind,
      modelSlug: basedOn?.slug ?? proposedSlug ?? undefined,
    }),
  );
  return { ok: true, value: { id } };
}

/** The name of the unique constraint a failed insert broke (PostgreSQL 23505), or null. */
function uniqueViolation(error: unknown): string | null {
  for (let e = error as { code?: string; constraint?: string; cause?: unknown } | undefined; e; e = e.cause as typeof e) {
    if (e.code === "23505") return e.constraint ?? "";
  }
  return null;
}

function parseKey(key: string): { slug: string; edition: number } | null {
  const m = /^ergoshelf:([a-z0-9-]+)@(\d+)$/.exec(key);
  return m ? { slug: m[1], edition: Number(m[2]) } : null;
}

type LockedProposal = typeof proposals.$inferSelect;
type Tx = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

/** Runs `change` with the proposal row locked; a Refused thrown inside rolls everything back. */
async function withLockedProposal<T>(id: string, change: (tx: Tx, p: LockedProposal) => Promise<T>): Promise<ProposalOutcome<T>> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return refuse(404, NOT_FOUND);
  try {
    const value = await db().transaction(async (tx) => {
      const [p] = await tx.select().from(proposals).where(eq(proposals.id, id)).for("update");
      if (!p) throw new Refused(refuse(404, NOT_FOUND));
      return change(tx, p);
    });
    return { ok: true, value };
  } catch (error) {
    if (error instanceof Refused) return error.refusal;
    throw error;
  }
}

async function authorOf(p: LockedProposal) {
  const [a] = await db().select({ email: users.email, name: users.name }).from(users).where(eq(users.id, p.authorId));
  return a;
}

/** After changes were requested: freezes the item's saved revision again and puts it back in the queue. */
export async function resubmitProposal(user: SessionUser, id: string, note: string): Promise<ProposalOutcome<{ id: string }>> {
  let snapshotTitle = "";
  const outcome = await withLockedProposal(id, async (tx, p) => {
    if (p.authorId !== user.id) throw new Refused(refuse(404, NOT_FOUND));
    if (p.state !== "changes-requested") throw new Refused(refuse(409, `Only a proposal with changes requested can be resubmitted; this one is ${p.state}.`));
    if (!p.itemId) throw new Refused(refuse(409, "The workspace item of this proposal was deleted, so there is nothing to resubmit; submit a new proposal instead."));
    const item = await getWorkspaceItem(user.id, p.itemId);
    if (!item) throw new Refused(refuse(409, "The workspace item of this proposal was deleted, so there is nothing to resubmit."));
    const checked = verifiedFigures(item.params);
    if (!checked.ok) throw new Refused(checked);
    if (checked.params.family !== p.family) throw new Refused(refuse(400, `The item is now a ${checked.params.family} model; the proposal is for a ${p.family} model.`));
    const old = p.snapshot as ProposalSnapshot;
    const snapshot: ProposalSnapshot = {
      ...old,
      params: checked.params,
      figures: checked.figures,
      revision: item.revision,
    };
    await tx.update(proposals).set({ state: "resubmitted", snapshot, updatedAt: new Date() }).where(eq(proposals.id, p.id));
    await tx.insert(reviewComments).values({
      proposalId: p.id,
      authorId: user.id,
      kind: "resubmitted",
      body: note,
    });
    await recordAudit(
      {
        actorId: user.id,
        action: "proposal.resubmit",
        target: p.id,
        details: { revision: item.revision },
      },
      tx,
    );
    snapshotTitle = p.title;
    return {
      id: p.id,
      kind: p.kind,
      slug: old.basedOn?.slug ?? p.proposedSlug ?? undefined,
    };
  });
  if (!outcome.ok) return outcome;
  await mailTo(
    await curatorsExcept(user.email),
    proposalSubmittedMail({
      proposalId: id,
      title: snapshotTitle,
      authorName: user.name,
      kind: outcome.value.kind,
      modelSlug: outcome.value.slug,
      resubmitted: true,
    }),
  );
  return { ok: true, value: { id } };
}

/** The author withdraws an open proposal. */
export async function withdrawProposal(user: SessionUser, id: string, note: string): Promise<ProposalOutcome<{ id: string }>> {
  return withLockedProposal(id, async (tx, p) => {
    if (p.authorId !== user.id) throw new Refused(refuse(404, NOT_FOUND));
    if (!isOpen(p.state)) throw new Refused(refuse(409, `This proposal is already ${p.state}; only an open proposal can be withdrawn.`));
    await tx.update(proposals).set({ state: "withdrawn", updatedAt: new Date() }).where(eq(proposals.id, p.id));
    await tx.insert(reviewComments).values({
      proposalId: p.id,
      authorId: user.id,
      kind: "withdrawn",
      body: note || "Withdrawn by the author.",
    });
    await recordAudit({ actorId: user.id, action: "proposal.withdraw", target: p.id }, tx);
    return { id: p.id };
  });
}

/**
 * A comment in the thread, by the author or a curator, while the proposal is open. The author hears
 * of curators' comments; curators who took part hear of the author's.
 */
export async function commentOnProposal(user: SessionUser, id: string, body: string): Promise<ProposalOutcome<{ id: string }>> {
  let mail: { to: string[]; content: MailContent } | null = null;
  const outcome = await withLockedProposal(id, async (tx, p) => {
    const isAuthor = p.authorId === user.id;
    if (!isAuthor && !hasRole(user, "curator")) throw new Refused(refuse(404, NOT_FOUND));
    if (!isOpen(p.state)) throw new Refused(refuse(409, `This proposal is ${p.state}; the thread is closed.`));
    await tx.insert(reviewComments).values({ proposalId: p.id, authorId: user.id, kind: "comment", body });
    if (!isAuthor) {
      const author = await authorOf(p);
      if (author)
        mail = {
          to: [author.email],
          content: newCommentMail({
            proposalId: p.id,
            title: p.title,
            commenterName: user.name,
            comment: body,
          }),
        };
    } else {
      const others = await tx
        .selectDistinct({ email: users.email })
        .from(reviewComments)
        .innerJoin(users, eq(users.id, reviewComments.authorId))
        .where(and(eq(reviewComments.proposalId, p.id), ne(reviewComments.authorId, user.id), eq(users.disabled, false)));
      // Curators read the proposal on the review page, not on the author's.
      if (others.length)
        mail = {
          to: others.map((o) => o.email),
          content: newCommentMail({
            proposalId: p.id,
            title: p.title,
            commenterName: user.name,
            comment: body,
            forCurators: true,
          }),
        };
    }
    return { id: p.id };
  });
  if (outcome.ok && mail) {
    const m = mail as { to: string[]; content: MailContent };
    await mailTo(m.to, m.content);
  }
  return outcome;
}

// ---------------------------------------------------------------------------------------------
// Curators' decisions

export interface DecisionResult {
  state: ProposalState;
  published: { slug: string; number: number; citationKey: string } | null;
}

/**
 * A curator's decision, with its required note. Accept publishes the snapshot in the same
 * transaction: the figures are recomputed and must pass verification, the model row is locked so
 * the next edition number is unique even when two curators accept at once, and the search index is
 * marked stale after the commit. An author never decides on their own proposal.
 */
export async function decideProposal(user: SessionUser, id: string, decision: Decision, note: string): Promise<ProposalOutcome<DecisionResult>> {
  if (!hasRole(user, "curator")) return refuse(403, "Only curators and administrators decide on proposals.");
  // Verify before taking any lock: it is the slow part, and it needs only the frozen snapshot.
  let checked: ReturnType<typeof verifiedFigures> | null = null;
  if (decision === "accept") {
    const [row] = /^[0-9a-f-]{36}$/i.test(id) ? await db().select({ snapshot: proposals.snapshot }).from(proposals).where(eq(proposals.id, id)) : [];
    if (!row) return refuse(404, NOT_FOUND);
    checked = verifiedFigures((row.snapshot as ProposalSnapshot).params);
    if (!checked.ok) return checked;
  }

  let mail: { to: string[]; content: MailContent } | null = null;
  const outcome = await withLockedProposal(id, async (tx, p): Promise<DecisionResult> => {
    if (p.authorId === user.id) throw new Refused(refuse(403, "You wrote this proposal, so another curator must review it."));
    const from = p.state;
    const allowed: Record<Decision, ProposalState[]> = {
      accept: ["submitted", "resubmitted"],
      "request-changes": ["submitted", "resubmitted"],
      decline: ["submitted", "resubmitted", "changes-requested"],
    };
    if (!allowed[decision].includes(from)) {
      const why = isOpen(from) ? "the author has not resubmitted it yet" : `it is already ${from}`;
      throw new Refused(refuse(409, `This proposal cannot be ${decision === "request-changes" ? "sent back for changes" : decision === "accept" ? "accepted" : "declined"} now: ${why}.`));
    }
    const author = await authorOf(p);
    const now = new Date();

    if (decision === "request-changes" || decision === "decline") {
      const state: ProposalState = decision === "decline" ? "declined" : "changes-requested";
      await tx
        .update(proposals)
        .set({
          state,
          decidedBy: decision === "decline" ? user.id : null,
          updatedAt: now,
        })
        .where(eq(proposals.id, p.id));
      await tx.insert(reviewComments).values({
        proposalId: p.id,
        authorId: user.id,
        kind: state,
        body: note,
      });
      await recordAudit(
        {
          actorId: user.id,
          action: decision === "decline" ? "proposal.decline" : "proposal.request-changes",
          target: p.id,
          details: { from },
        },
        tx,
      );
      if (author) {
        mail = {
          to: [author.email],
          content:
            decision === "decline"
              ? proposalDeclinedMail({
                  proposalId: p.id,
                  title: p.title,
                  curatorName: user.name,
                  reason: note,
                })
              : changesRequestedMail({
                  proposalId: p.id,
                  title: p.title,
                  curatorName: user.name,
                  note,
                }),
        };
      }
      return { state, published: null };
    }

    // Accept: publish. The snapshot may not have changed since it was verified (the row is locked
    // now, and resubmission is the only writer of snapshots); compare to be sure.
    const snapshot = p.snapshot as ProposalSnapshot;
    if (!checked?.ok || contentHash(checked.params) !== contentHash(snapshot.params)) {
      throw new Refused(refuse(409, "The proposal changed while it was being verified; open it again and repeat the decision."));
    }
    let modelId: string;
    let slug: string;
    let number: number;
    if (p.kind === "new-edition") {
      if (!p.targetModelId) throw new Refused(refuse(409, "This proposal names no model to add an edition to."));
      // The model row lock serialises concurrent publishes of the same model.
      const [m] = await tx.select({ id: models.id, slug: models.slug }).from(models).where(eq(models.id, p.targetModelId)).for("update");
      if (!m) throw new Refused(refuse(409, "The model of this proposal is no longer in the library."));
      const [{ last }] = await tx
        .select({ last: max(editions.number) })
        .from(editions)
        .where(eq(editions.modelId, m.id));
      modelId = m.id;
      slug = m.slug;
      number = (last ?? 0) + 1;
      await tx.update(models).set({ updatedAt: now }).where(eq(models.id, m.id));
    } else {
      const meta = snapshot.model;
      if (!p.proposedSlug || !meta) throw new Refused(refuse(409, "This new-model proposal has no slug or summary."));
      const [inserted] = await tx
        .insert(models)
        .values({
          slug: p.proposedSlug,
          title: p.title,
          family: p.family,
          summary: meta.summary,
          tags: meta.tags,
          provenance: meta.provenance,
          methods: [],
        })
        .onConflictDoNothing({ target: models.slug })
        .returning({ id: models.id });
      if (!inserted) throw new Refused(refuse(409, `The slug “${p.proposedSlug}” was taken by another model in the meantime; ask the author for another slug.`));
      modelId = inserted.id;
      slug = p.proposedSlug;
      number = 1;
    }
    const [edition] = await tx
      .insert(editions)
      .values({
        modelId,
        number,
        params: checked.params,
        contentHash: contentHash(checked.params),
        figures: checked.figures,
        verification: checked.figures.verification,
        engineVersion: ENGINE_VERSION,
        note: p.changeNote,
        publishedAt: now,
        publishedBy: user.id,
      })
      .returning({ id: editions.id });
    const key = citationKey(slug, number);
    await tx
      .update(proposals)
      .set({
        state: "accepted",
        decidedBy: user.id,
        publishedEditionId: edition.id,
        updatedAt: now,
      })
      .where(eq(proposals.id, p.id));
    await tx.insert(reviewComments).values({
      proposalId: p.id,
      authorId: user.id,
      kind: "accepted",
      body: note,
    });
    await recordAudit(
      {
        actorId: user.id,
        action: "proposal.accept",
        target: p.id,
        details: { from, edition: key },
      },
      tx,
    );
    await recordAudit(
      {
        actorId: user.id,
        action: "edition.publish",
        target: key,
        details: {
          proposal: p.id,
          author: p.authorId,
          contentHash: contentHash(checked.params),
          engineVersion: ENGINE_VERSION,
        },
      },
      tx,
    );
    if (author)
      mail = {
        to: [author.email],
        content: proposalAcceptedMail({
          proposalId: p.id,
          title: p.title,
          curatorName: user.name,
          citationKey: key,
          note,
        }),
      };
    return {
      state: "accepted",
      published: { slug, number, citationKey: key },
    };
  });
  if (!outcome.ok) return outcome;
  if (outcome.value.published) invalidateSearchIndex();
  if (mail) {
    const m = mail as { to: string[]; content: MailContent };
    await mailTo(m.to, m.content);
  }
  return outcome;
}
