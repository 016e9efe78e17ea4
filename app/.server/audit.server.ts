/**
 * The audit log: who did what to which record, and when. Written inside the transaction of the
 * change it records, so a rolled-back change leaves no entry and a committed one always has one.
 */
import { db } from "./db.server";
import { auditLog } from "./schema";

/** Actions the log records; the admin page prints them as they are. */
export type AuditAction =
  | "sign-in.failed"
  | "proposal.submit"
  | "proposal.resubmit"
  | "proposal.withdraw"
  | "proposal.request-changes"
  | "proposal.decline"
  | "proposal.accept"
  | "edition.publish"
  | "edition.retract"
  | "user.role-change"
  | "user.disable"
  | "user.enable";

export interface AuditEntry {
  actorId: string | null;
  action: AuditAction;
  /** What the action was done to, readable on its own: a citation key, a proposal id, an e-mail. */
  target: string;
  details?: Record<string, unknown>;
}

type Executor = Pick<ReturnType<typeof db>, "insert">;

/** Appends one entry, through the caller's transaction when one is given. */
export async function recordAudit(entry: AuditEntry, executor: Executor = db()): Promise<void> {
  await executor.insert(auditLog).values({ actorId: entry.actorId, action: entry.action, target: entry.target, details: entry.details ?? {} });
}
