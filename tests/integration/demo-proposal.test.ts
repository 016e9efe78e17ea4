// The demo seed (scripts/seed.ts, run by npm start and npm test) leaves one open proposal, so a
// curator's review queue is not empty on first start; seeding again adds nothing.
import { and, eq, inArray, sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { DEMO_PROPOSAL_TITLE, seedDemoProposal } from "~/.server/demo-proposal.server";
import { proposals, users, workspaceItems } from "~/.server/schema";
import { openProposalStates } from "~/proposal-forms";
import { createUser, get, removeCreatedUsers } from "./fixtures";

afterAll(removeCreatedUsers);

async function demoItems() {
  return db()
    .select({ id: workspaceItems.id })
    .from(workspaceItems)
    .innerJoin(users, eq(users.id, workspaceItems.ownerId))
    .where(and(eq(workspaceItems.title, DEMO_PROPOSAL_TITLE), sql`lower(${users.email}) = 'contributor@example.org'`));
}

describe("demo proposal", () => {
  it("is open for review after the seed, as a new edition of the mooring tension alarm", async () => {
    const items = await demoItems();
    expect(items).toHaveLength(1);
    const [p] = await db().select().from(proposals).where(eq(proposals.itemId, items[0].id));
    expect(p.kind).toBe("new-edition");
    expect(openProposalStates).toContain(p.state);
    expect(p.title).toBe("Mooring line tension alarm");
  });

  it("shows in a curator's review queue", async () => {
    const curator = await createUser("curator");
    const page = await get("/review", curator.cookie);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain("Mooring line tension alarm");
  });

  it("is not seeded twice", async () => {
    expect(await seedDemoProposal()).toBe(false);
    const items = await demoItems();
    expect(items).toHaveLength(1);
    expect(await db().select({ id: proposals.id }).from(proposals).where(inArray(proposals.itemId, items.map((i) => i.id)))).toHaveLength(1);
  });
});
