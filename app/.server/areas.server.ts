/**
 * Queries for the administration page: the accounts and the audit log.
 */
import { asc, count, desc, eq } from "drizzle-orm";
import { db } from "./db.server";
import { auditLog, users } from "./schema";

export async function allUsers() {
  return db()
    .select({ id: users.id, email: users.email, name: users.name, role: users.role, disabled: users.disabled, isDemo: users.isDemo, createdAt: users.createdAt })
    .from(users)
    .orderBy(asc(users.email));
}

export const AUDIT_PAGE_SIZE = 50;

/** One page of the audit log, newest first, optionally of one action only. */
export async function auditPage(opts: { action?: string; page: number }) {
  const where = opts.action ? eq(auditLog.action, opts.action) : undefined;
  const [rows, [{ total }], actions] = await Promise.all([
    db()
      .select({ id: auditLog.id, action: auditLog.action, target: auditLog.target, details: auditLog.details, at: auditLog.at, actor: users.email })
      .from(auditLog)
      .leftJoin(users, eq(users.id, auditLog.actorId))
      .where(where)
      .orderBy(desc(auditLog.at), desc(auditLog.id))
      .limit(AUDIT_PAGE_SIZE)
      .offset((opts.page - 1) * AUDIT_PAGE_SIZE),
    db().select({ total: count() }).from(auditLog).where(where),
    db().selectDistinct({ action: auditLog.action }).from(auditLog).orderBy(asc(auditLog.action)),
  ]);
  return { rows, total, pages: Math.max(1, Math.ceil(total / AUDIT_PAGE_SIZE)), actions: actions.map((a) => a.action) };
}
