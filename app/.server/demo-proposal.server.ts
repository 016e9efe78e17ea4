/**
 * One open proposal for the demo, so a curator's review queue is not empty on first start: the
 * demo contributor's refit of the mooring line tension alarm, submitted as a new edition. Seeded
 * through the same workspace and proposal functions as the pages use (validated, computed and
 * verified), without mail. Idempotent: skipped when the contributor already has the item.
 */
import { and, eq, sql } from "drizzle-orm";
import { db } from "./db.server";
import { demoUsers } from "./demo-users.server";
import { submitProposal } from "./proposals.server";
import { users, workspaceItems } from "./schema";
import { cloneEditionToWorkspace, getWorkspaceItem, saveWorkspaceItem } from "./workspace.server";

const SLUG = "mooring-tension-alarm";
export const DEMO_PROPOSAL_TITLE = "Mooring tension alarm, refit after the storm season";

/** Seeds the demo proposal if it is missing; returns whether it was added. */
export async function seedDemoProposal(): Promise<boolean> {
  const email = demoUsers.find((u) => u.role === "contributor")?.email;
  if (!email) return false;
  const [author] = await db().select({ id: users.id, email: users.email, name: users.name }).from(users).where(sql`lower(${users.email}) = ${email}`);
  if (!author) return false;
  const [existing] = await db()
    .select({ id: workspaceItems.id })
    .from(workspaceItems)
    .where(and(eq(workspaceItems.ownerId, author.id), eq(workspaceItems.title, DEMO_PROPOSAL_TITLE)))
    .limit(1);
  if (existing) return false;

  const itemId = await cloneEditionToWorkspace(author.id, SLUG, null, DEMO_PROPOSAL_TITLE);
  if (!itemId) throw new Error(`demo proposal: the catalogue has no model ${SLUG}`);
  const item = await getWorkspaceItem(author.id, itemId);
  if (!item || item.params.family !== "two-state") throw new Error(`demo proposal: ${SLUG} is not a two-state chain`);
  const saved = await saveWorkspaceItem(author.id, itemId, {
    baseRevision: item.revision,
    title: DEMO_PROPOSAL_TITLE,
    notes: "Refit on 210 days of 10-second samples, including the storm season; alarms now clear a little faster.",
    params: { ...item.params, a: 0.00068, b: 0.101 },
  });
  if (!saved.ok) throw new Error(`demo proposal: saving failed: ${saved.message}`);
  const submitted = await submitProposal(
    { id: author.id, email: author.email, name: author.name, role: "contributor" },
    itemId,
    { kind: "new-edition", changeNote: "Refit on 210 days of 10-second samples (was 120), storm season included: a 0.0007 → 0.00068, b 0.093 → 0.101." },
    { mail: false },
  );
  if (!submitted.ok) throw new Error(`demo proposal: submission refused: ${submitted.message}`);
  return true;
}
