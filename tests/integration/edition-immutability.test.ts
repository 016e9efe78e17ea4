// Published editions are protected by the database itself, not only by the application.
import { randomBytes } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { editions, models } from "~/.server/schema";

let editionId = "";

beforeAll(async () => {
  const [model] = await db()
    .insert(models)
    .values({ slug: `immutability-${randomBytes(4).toString("hex")}`, title: "Guard check", family: "iid", summary: "A test model.", isSynthetic: true })
    .returning();
  const [ed] = await db()
    .insert(editions)
    .values({ modelId: model.id, number: 1, params: { family: "iid", alphabet: ["0", "1"], p: [0.5, 0.5] }, contentHash: "h", figures: {}, verification: {}, engineVersion: "test" })
    .returning();
  editionId = ed.id;
});
afterAll(async () => {
  // The model row stays (editions reference it and cannot be deleted); it is marked synthetic so the library ignores it.
});

async function expectRefused(run: () => Promise<unknown>, message: RegExp) {
  await expect(run()).rejects.toMatchObject({ cause: expect.objectContaining({ message: expect.stringMatching(message) }) });
}

describe("edition guard", () => {
  it("refuses an UPDATE of the parameters", async () => {
    await expectRefused(
      () => db().update(editions).set({ params: { family: "iid", alphabet: ["0", "1"], p: [0.9, 0.1] } }).where(eq(editions.id, editionId)),
      /immutable/,
    );
  });
  it("refuses an UPDATE of the figures", async () => {
    await expectRefused(() => db().update(editions).set({ figures: { entropyRate: { bits: 1 } } }).where(eq(editions.id, editionId)), /immutable/);
  });
  it("refuses a DELETE", async () => {
    await expectRefused(() => db().delete(editions).where(eq(editions.id, editionId)), /cannot be deleted/);
  });
  it("refuses TRUNCATE", async () => {
    await expectRefused(() => db().execute(sql`truncate editions cascade`), /cannot be truncated/);
  });
  it("refuses a retraction without a reason", async () => {
    await expectRefused(() => db().update(editions).set({ retractedAt: new Date() }).where(eq(editions.id, editionId)), /reason/);
  });
  it("records a retraction once, then refuses further changes", async () => {
    await db().update(editions).set({ retractedAt: new Date(), retractionReason: "test" }).where(eq(editions.id, editionId));
    const [row] = await db().select().from(editions).where(eq(editions.id, editionId));
    expect(row.retractionReason).toBe("test");
    await expectRefused(() => db().update(editions).set({ retractionReason: "changed" }).where(eq(editions.id, editionId)), /retracted/);
  });
});
