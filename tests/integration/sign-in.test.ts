// Sign-in, sessions and sign-out against the real server and database.
import { eq, sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { auditLog, sessions, users } from "~/.server/schema";
import { hashSessionId } from "~/.server/session.server";
import { createUser, get, postForm, removeCreatedUsers } from "./fixtures";

afterAll(removeCreatedUsers);

function sessionCookieFrom(res: Response): string {
  const header = res.headers.get("set-cookie") ?? "";
  return header.split(";")[0];
}

async function sessionCount(userId: string) {
  const rows = await db().select({ n: sql<number>`count(*)::int` }).from(sessions).where(eq(sessions.userId, userId));
  return rows[0].n;
}

describe("sign-in", () => {
  it("signs a demo contributor in and sends them to the library", async () => {
    const res = await postForm("/sign-in", { email: "contributor@example.org", password: "ergoshelf-demo" });
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe("/library");
    const setCookie = res.headers.get("set-cookie") ?? "";
    expect(setCookie).toMatch(/HttpOnly/i);
    expect(setCookie).toMatch(/SameSite=Lax/i);
    expect(setCookie).toMatch(/Secure/i); // NODE_ENV=production in the test server
    const home = await (await get("/", sessionCookieFrom(res))).text();
    expect(home).toContain("Mei Hartmann");
  });

  it("honours a local redirectTo and ignores one that leaves the site", async () => {
    const user = await createUser("curator");
    const local = await postForm("/sign-in?redirectTo=%2Freview", { email: user.email, password: user.password });
    expect(local.headers.get("location")).toBe("/review");
    for (const target of ["//elsewhere.invalid/x", "https://elsewhere.invalid/", "/\\elsewhere.invalid"]) {
      const res = await postForm(`/sign-in?redirectTo=${encodeURIComponent(target)}`, { email: user.email, password: user.password });
      expect(res.headers.get("location")).toBe("/library");
    }
  });

  it("gives the same message for a wrong password and an unknown e-mail, and records the failure", async () => {
    const user = await createUser("contributor");
    const wrong = await postForm("/sign-in", { email: user.email, password: "not-the-password" });
    const unknown = await postForm("/sign-in", { email: "nobody@test.invalid", password: "whatever" });
    expect(wrong.status).toBe(400);
    expect(unknown.status).toBe(400);
    const message = "That e-mail and password do not match an account.";
    expect(await wrong.text()).toContain(message);
    expect(await unknown.text()).toContain(message);
    const audit = await db().select().from(auditLog).where(eq(auditLog.target, user.email.toLowerCase()));
    expect(audit.some((a) => a.action === "sign-in.failed")).toBe(true);
  });

  it("asks for the missing field when a field is empty", async () => {
    const res = await postForm("/sign-in", { email: "", password: "x" });
    expect(res.status).toBe(400);
    expect(await res.text()).toContain("Enter your e-mail address.");
  });

  it("rotates the session id on sign-in: the old session row is removed", async () => {
    const user = await createUser("contributor");
    expect(await sessionCount(user.id)).toBe(1);
    const res = await postForm("/sign-in", { email: user.email, password: user.password }, user.cookie);
    expect(res.status).toBe(302);
    const fresh = sessionCookieFrom(res);
    expect(fresh).not.toBe(user.cookie);
    expect(await sessionCount(user.id)).toBe(1);
    expect((await get("/workspace", user.cookie)).status).toBe(302);
    expect((await get("/workspace", fresh)).status).toBe(200);
  });

  it("stores only a hash of the session id", async () => {
    const user = await createUser("contributor");
    const raw = decodeURIComponent(user.cookie.split("=")[1]);
    const rows = await db().select().from(sessions).where(eq(sessions.userId, user.id));
    expect(rows).toHaveLength(1);
    expect(rows[0].idHash).toMatch(/^[0-9a-f]{64}$/);
    expect(rows[0].idHash).not.toContain(raw.slice(0, 12));
  });

  it("sign-out deletes the session row", async () => {
    const user = await createUser("contributor");
    const res = await postForm("/sign-out", {}, user.cookie);
    expect(res.status).toBe(302);
    expect(await sessionCount(user.id)).toBe(0);
    expect((await get("/workspace", user.cookie)).status).toBe(302);
  });

  it("a role change and a disabled account take effect at once", async () => {
    const user = await createUser("curator");
    expect((await get("/review", user.cookie)).status).toBe(200);
    await db().update(users).set({ role: "contributor" }).where(eq(users.id, user.id));
    expect((await get("/review", user.cookie)).status).toBe(403);
    await db().update(users).set({ disabled: true }).where(eq(users.id, user.id));
    expect((await get("/workspace", user.cookie)).status).toBe(302);
    const again = await postForm("/sign-in", { email: user.email, password: user.password });
    expect(again.status).toBe(400);
    expect(await again.text()).toContain("This account is disabled");
  });

  it("hashes passwords with bcrypt at cost 12 or more", async () => {
    const [row] = await db().select({ h: users.passwordHash }).from(users).where(eq(users.email, "admin@example.org"));
    const cost = Number(row.h.split("$")[2]);
    expect(row.h).toMatch(/^\$2[aby]\$/);
    expect(cost).toBeGreaterThanOrEqual(12);
  });

  it("keeps a forged session cookie out", async () => {
    const forged = `ergoshelf_session=${encodeURIComponent(hashSessionId("x").slice(0, 43))}`;
    expect((await get("/workspace", forged)).status).toBe(302);
  });
});
