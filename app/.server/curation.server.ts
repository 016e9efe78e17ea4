/**
 * Curators' and administrators' changes outside the review of proposals: retracting a published
 * edition, and changing an account's role or status. Each change and its audit entry are written in
 * one transaction, with the changed row locked, so two people acting at once cannot both succeed.
 */
import { and, eq, ne, sql } from "drizzle-orm";
import { citationKey } from "~/citations";
import { hasRole, roleLabels, type Role, type SessionUser } from "~/permissions";
import { recordAudit } from "./audit.server";
import { db } from "./db.server";
import { editions, models, sessions, users } from "./schema";
import { invalidateSearchIndex } from "./search.server";

export type CurationOutcome<T> = { ok: true; value: T } | { ok: false; status: 400 | 403 | 404 | 409; message: string };

class Refused extends Error {
  constructor(readonly outcome: Extract<CurationOutcome<never>, { ok: false }>) {
    super(outcome.message);
  }
}

const refuse = (status: 400 | 403 | 404 | 409, message: string) => new Refused({ ok: false, status, message });

async function inTransaction<T>(change: (tx: Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0]) => Promise<T>): Promise<CurationOutcome<T>> {
  try {
    return { ok: true, value: await db().transaction(change) };
  } catch (error) {
    if (error instanceof Refused) return error.outcome;
    throw error;
  }
}

/**
 * Retracts edition `number` of `slug` with the curator's reason. The edition stays (citations keep
 * resolving) with a banner; the library's current edition becomes the newest unretracted one.
 * An edition is retracted once: a second attempt is refused (409), as the database also refuses.
 */
export async function retractEdition(user: SessionUser, slug: string, number: number, reason: string): Promise<CurationOutcome<{ citationKey: string }>> {
  if (!hasRole(user, "curator")) return { ok: false, status: 403, message: "Only curators and administrators retract editions." };
  const outcome = await inTransaction(async (tx) => {
    const [row] = await tx
      .select({ id: editions.id, retractedAt: editions.retractedAt })
      .from(editions)
      .innerJoin(models, eq(models.id, editions.modelId))
      .where(and(eq(models.slug, slug), eq(editions.number, number)))
      .for("update", { of: editions });
    if (!row) throw refuse(404, `There is no edition ${number} of ${slug}.`);
    if (row.retractedAt) throw refuse(409, `Edition ${number} of ${slug} is already retracted.`);
    await tx.update(editions).set({ retractedAt: new Date(), retractionReason: reason, retractedBy: user.id }).where(eq(editions.id, row.id));
    const key = citationKey(slug, number);
    await recordAudit({ actorId: user.id, action: "edition.retract", target: key, details: { reason } }, tx);
    return { citationKey: key };
  });
  if (outcome.ok) invalidateSearchIndex();
  return outcome;
}

/**
 * Sets an account's role. An administrator cannot change their own role (another administrator
 * must), so the server never loses its last administrator by accident. Sessions stay valid: the
 * role is read on every request, so the change takes effect at once.
 */
export async function changeRole(actor: SessionUser, userId: string, role: Role): Promise<CurationOutcome<{ email: string; from: Role; to: Role }>> {
  if (!hasRole(actor, "admin")) return { ok: false, status: 403, message: "Only administrators change roles." };
  if (userId === actor.id) return { ok: false, status: 409, message: "You cannot change your own role; ask another administrator." };
  return inTransaction(async (tx) => {
    const [target] = await tx.select({ id: users.id, email: users.email, role: users.role }).from(users).where(eq(users.id, userId)).for("update");
    if (!target) throw refuse(404, "There is no such account.");
    const from = target.role as Role;
    if (from === role) throw refuse(409, `${target.email} is already ${roleLabels[role].toLowerCase()}.`);
    await tx.update(users).set({ role }).where(eq(users.id, userId));
    await recordAudit({ actorId: actor.id, action: "user.role-change", target: target.email, details: { from, to: role } }, tx);
    return { email: target.email, from, to: role };
  });
}

/**
 * Disables or enables an account. Disabling signs the account out everywhere (its sessions are
 * deleted in the same transaction). An administrator cannot disable their own account, and the
 * last enabled administrator cannot be disabled.
 */
export async function setDisabled(actor: SessionUser, userId: string, disabled: boolean): Promise<CurationOutcome<{ email: string }>> {
  if (!hasRole(actor, "admin")) return { ok: false, status: 403, message: "Only administrators disable or enable accounts." };
  if (userId === actor.id) return { ok: false, status: 409, message: "You cannot disable your own account; ask another administrator." };
  return inTransaction(async (tx) => {
    const [target] = await tx.select({ id: users.id, email: users.email, role: users.role, disabled: users.disabled }).from(users).where(eq(users.id, userId)).for("update");
    if (!target) throw refuse(404, "There is no such account.");
    if (target.disabled === disabled) throw refuse(409, `${target.email} is already ${disabled ? "disabled" : "enabled"}.`);
    if (disabled && target.role === "admin") {
      const [{ others }] = await tx
        .select({ others: sql<number>`count(*)::int` })
        .from(users)
        .where(and(eq(users.role, "admin"), eq(users.disabled, false), ne(users.id, userId)));
      if (others === 0) throw refuse(409, `${target.email} is the last enabled administrator.`);
    }
    await tx.update(users).set({ disabled }).where(eq(users.id, userId));
    if (disabled) await tx.delete(sessions).where(eq(sessions.userId, userId));
    await recordAudit({ actorId: actor.id, action: disabled ? "user.disable" : "user.enable", target: target.email }, tx);
    return { email: target.email };
  });
}
