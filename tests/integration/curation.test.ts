// Retraction by curators and account changes by administrators, over HTTP against the built
// server: who may, what is refused (with the reason, changing nothing), and the audit log.
import { randomBytes } from "node:crypto";
import { and, eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { auditLog, editions, models, proposals, sessions, users } from "~/.server/schema";
import { createUser, get, postForm, publishThroughReview, removeCreatedUsers, type TestUser } from "./fixtures";

let contributor: TestUser;
let curator: TestUser;
let publisher: TestUser;
let admin: TestUser;
let admin2: TestUser;

beforeAll(async () => {
  contributor = await createUser("contributor");
  // Both curators publish or retract editions, so they stay (an edition names them for good).
  curator = await createUser("curator", { keep: true });
  publisher = await createUser("curator", { keep: true });
  admin = await createUser("admin");
  admin2 = await createUser("admin");
});

afterAll(async () => {
  const ids = [contributor, curator, publisher, admin, admin2].filter(Boolean).map((u) => u.id);
  await db().delete(proposals).where(inArray(proposals.authorId, ids));
  await removeCreatedUsers();
});

async function edition(slug: string, number: number) {
  const [row] = await db()
    .select({ retractedAt: editions.retractedAt, reason: editions.retractionReason, by: editions.retractedBy })
    .from(editions)
    .innerJoin(models, eq(models.id, editions.modelId))
    .where(and(eq(models.slug, slug), eq(editions.number, number)));
  return row;
}

const auditOf = (action: string, target: string) => db().select().from(auditLog).where(and(eq(auditLog.action, action), eq(auditLog.target, target)));

describe("retracting an edition", () => {
  const slug = `fixture-retract-${randomBytes(4).toString("hex")}`;
  const reason = "The recount double-counted status bytes after a relay reboot; edition 1 stands.";

  beforeAll(async () => {
    await publishThroughReview(contributor, publisher, slug, [
      [0.6, 0.4],
      [0.55, 0.45],
    ]);
  });

  it("offers curators the retraction form and refuses it to contributors (403) and visitors (sign-in)", async () => {
    const page = (await (await get(`/review/retract/${slug}/2`, curator.cookie)).text()).replace(/<!-- -->/g, "");
    expect(page).toContain('data-testid="retract-form"');
    expect(page).toContain("The model page will show edition 1");
    expect((await get(`/review/retract/${slug}/2`, contributor.cookie)).status).toBe(403);
    expect((await postForm(`/review/retract/${slug}/2`, { reason, confirm: "yes" }, contributor.cookie)).status).toBe(403);
    expect((await get(`/review/retract/${slug}/2`)).status).toBe(302);
    expect((await edition(slug, 2)).retractedAt).toBeNull();
    // The model page links curators to the form, and not contributors.
    expect(await (await get(`/library/${slug}/e/2`, curator.cookie)).text()).toContain(`href="/review/retract/${slug}/2"`);
    expect(await (await get(`/library/${slug}/e/2`, contributor.cookie)).text()).not.toContain("/review/retract/");
  });

  it("refuses a missing or too short reason, a missing confirmation and an unknown edition, changing nothing", async () => {
    const cases: [Record<string, string>, number, string][] = [
      [{ reason: "", confirm: "yes" }, 400, "give the reason in a sentence"],
      [{ reason: "bad fit", confirm: "yes" }, 400, "at least 10 characters"],
      [{ reason }, 400, "tick the box to confirm"],
    ];
    for (const [fields, status, message] of cases) {
      const res = await postForm(`/review/retract/${slug}/2`, fields, curator.cookie);
      expect(res.status).toBe(status);
      expect(await res.text()).toContain(message);
    }
    expect((await postForm(`/review/retract/${slug}/9`, { reason, confirm: "yes" }, curator.cookie)).status).toBe(404);
    expect((await get(`/review/retract/${slug}/one`, curator.cookie)).status).toBe(404);
    expect((await edition(slug, 2)).retractedAt).toBeNull();
    expect(await auditOf("edition.retract", `ergoshelf:${slug}@2`)).toHaveLength(0);
  });

  it("retracts with the reason: the row, the audit entry, the banner, the API, and the current edition moves on", async () => {
    const res = await postForm(`/review/retract/${slug}/2`, { reason, confirm: "yes" }, curator.cookie);
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe(`/library/${slug}/e/2`);
    const row = await edition(slug, 2);
    expect(row.retractedAt).not.toBeNull();
    expect(row).toMatchObject({ reason, by: curator.id });
    const [audit] = await auditOf("edition.retract", `ergoshelf:${slug}@2`);
    expect(audit.actorId).toBe(curator.id);
    expect(audit.details).toEqual({ reason });

    const page = (await (await get(`/library/${slug}/e/2`)).text()).replace(/<!-- -->/g, "");
    expect(page).toContain("Edition 2 was retracted on");
    expect(page).toContain(`href="/library/${slug}/e/1"`);
    expect(page).toContain(reason);
    const api = (await (await get(`/api/v1/models/${slug}/editions/2`)).json()) as { retraction: { reason: string } | null };
    expect(api.retraction?.reason).toBe(reason);
    // The newest unretracted edition is the current one again.
    const model = (await (await get(`/api/v1/models/${slug}`)).json()) as { latestEdition: number };
    expect(model.latestEdition).toBe(1);
    const current = (await (await get(`/library/${slug}`)).text()).replace(/<!-- -->/g, "");
    expect(current).toMatch(/Edition <strong[^>]*>1<\/strong> of 2/);
  });

  it("refuses a second retraction of the same edition (409) and records nothing more", async () => {
    const res = await postForm(`/review/retract/${slug}/2`, { reason: "Another reason, given twice.", confirm: "yes" }, publisher.cookie);
    expect(res.status).toBe(409);
    expect(await res.text()).toContain("already retracted");
    expect((await edition(slug, 2)).reason).toBe(reason);
    expect(await auditOf("edition.retract", `ergoshelf:${slug}@2`)).toHaveLength(1);
  });
});

describe("account changes by administrators", () => {
  let target: TestUser;
  beforeAll(async () => {
    target = await createUser("contributor");
  });

  const roleOf = async (id: string) => (await db().select({ role: users.role, disabled: users.disabled }).from(users).where(eq(users.id, id)))[0];

  it("refuses account changes to curators and contributors (403)", async () => {
    for (const who of [curator, contributor]) {
      expect((await postForm("/admin", { intent: "role", userId: target.id, role: "admin" }, who.cookie)).status).toBe(403);
    }
    expect((await roleOf(target.id)).role).toBe("contributor");
  });

  it("changes a role, records user.role-change with from and to, and the new role holds at once", async () => {
    expect((await get("/review", target.cookie)).status).toBe(403);
    const res = await postForm("/admin", { intent: "role", userId: target.id, role: "curator" }, admin.cookie);
    expect(res.status).toBe(302);
    expect((await roleOf(target.id)).role).toBe("curator");
    const [audit] = await auditOf("user.role-change", target.email);
    expect(audit).toMatchObject({ actorId: admin.id, details: { from: "contributor", to: "curator" } });
    expect((await get("/review", target.cookie)).status).toBe(200);
    const log = await (await get("/admin?action=user.role-change", admin.cookie)).text();
    expect(log).toContain(target.email);
  });

  it("refuses bad input and pointless or unsafe changes with the reason, changing nothing", async () => {
    const before = (await db().select().from(auditLog).where(eq(auditLog.target, target.email))).length;
    const cases: [Record<string, string>, number, string][] = [
      [{ intent: "role", userId: target.id, role: "owner" }, 400, "the role is one of contributor, curator, admin"],
      [{ intent: "role", userId: "not-a-uuid", role: "admin" }, 400, "the account is not named correctly"],
      [{ intent: "promote", userId: target.id }, 400, 'intent must be "role", "disable" or "enable"'],
      [{ intent: "role", userId: target.id, role: "curator" }, 409, "is already curator"],
      [{ intent: "role", userId: admin.id, role: "contributor" }, 409, "cannot change your own role"],
      [{ intent: "disable", userId: admin.id }, 409, "cannot disable your own account"],
      [{ intent: "enable", userId: target.id }, 409, "is already enabled"],
      [{ intent: "role", userId: "00000000-0000-4000-8000-000000000000", role: "admin" }, 404, "no such account"],
    ];
    for (const [fields, status, message] of cases) {
      const res = await postForm("/admin", fields, admin.cookie);
      expect(res.status, JSON.stringify(fields)).toBe(status);
      expect((await res.text()).replace(/&quot;/g, '"')).toContain(message);
    }
    expect(await roleOf(admin.id)).toEqual({ role: "admin", disabled: false });
    expect((await db().select().from(auditLog).where(eq(auditLog.target, target.email))).length).toBe(before);
  });

  it("disables an account: its sessions end at once, the audit log says so; enabling lets it sign in again", async () => {
    expect((await postForm("/admin", { intent: "disable", userId: target.id }, admin.cookie)).status).toBe(302);
    expect(await roleOf(target.id)).toMatchObject({ disabled: true });
    expect(await db().select().from(sessions).where(eq(sessions.userId, target.id))).toHaveLength(0);
    expect((await get("/workspace", target.cookie)).status).toBe(302);
    expect(await auditOf("user.disable", target.email)).toHaveLength(1);

    expect((await postForm("/admin", { intent: "enable", userId: target.id }, admin2.cookie)).status).toBe(302);
    expect(await roleOf(target.id)).toMatchObject({ disabled: false });
    expect(await auditOf("user.enable", target.email)).toHaveLength(1);
    const signIn = await postForm("/sign-in", { email: target.email, password: target.password }, undefined);
    expect(signIn.status).toBe(302);
  });
});
