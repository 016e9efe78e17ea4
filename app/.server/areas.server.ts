/**
 * Queries for the signed-in areas' front pages.
 */
import { asc, desc, eq, sql } from "drizzle-orm";
import { db } from "./db.server";
import { auditLog, proposals, users, workspaceItems } from "./schema";

export async function workspaceItemsOf(userId: string) {
  return db()
    .select({ id: workspaceItems.id, title: workspaceItems.title, family: workspaceItems.family, revision: workspaceItems.revision, updatedAt: workspaceItems.updatedAt })
    .from(workspaceItems)
    .where(eq(workspaceItems.ownerId, userId))
    .orderBy(desc(workspaceItems.updatedAt));
}

export async function openProposals() {
  return db()
    .select({ id: proposals.id, title: proposals.title, family: proposals.family, state: proposals.state, createdAt: proposals.createdAt, author: users.name })
    .from(proposals)
    .innerJoin(users, eq(users.id, proposals.authorId))
    .where(sql`${proposals.state} in ('submitted', 'resubmitted', 'changes-requested')`)
    .orderBy(asc(proposals.createdAt));
}

export async function allUsers() {
  return db()
    .select({ id: users.id, email: users.email, name: users.name, role: users.role, disabled: users.disabled, createdAt: users.createdAt })
    .from(users)
    .orderBy(asc(users.email));
}

export async function recentAudit(limit = 20) {
  return db()
    .select({ id: auditLog.id, action: auditLog.action, target: auditLog.target, at: auditLog.at, actor: users.email })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .orderBy(desc(auditLog.at))
    .limit(limit);
}
