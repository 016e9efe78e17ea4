// Fixtures that create users and sessions directly in the database and remove them afterwards.
import { randomBytes } from "node:crypto";
import { inArray } from "drizzle-orm";
import { hashPassword } from "~/.server/auth.server";
import { closeDb, db } from "~/.server/db.server";
import { users } from "~/.server/schema";
import { createSessionCookieHeader } from "~/.server/session.server";
import type { Role } from "~/permissions";

export const baseUrl = process.env.ERGOSHELF_TEST_BASE_URL!;

export interface TestUser {
  id: string;
  email: string;
  password: string;
  role: Role;
  cookie: string;
}

const created: string[] = [];

/**
 * A fresh user of the given role with a signed-in session. `keep` leaves the user in the test
 * database afterwards: a user who published an edition cannot be removed, since editions are
 * immutable and name their publisher.
 */
export async function createUser(role: Role, opts: { disabled?: boolean; keep?: boolean } = {}): Promise<TestUser> {
  const email = `t-${role}-${randomBytes(5).toString("hex")}@test.invalid`;
  const password = `pw-${randomBytes(8).toString("hex")}`;
  const [row] = await db()
    .insert(users)
    .values({ email, name: `Test ${role}`, role, passwordHash: await hashPassword(password), disabled: opts.disabled ?? false })
    .returning({ id: users.id });
  if (!opts.keep) created.push(row.id);
  const cookie = await createSessionCookieHeader(row.id);
  return { id: row.id, email, password, role, cookie };
}

/** Removes the users this file created (their sessions go with them). */
export async function removeCreatedUsers() {
  if (created.length) await db().delete(users).where(inArray(users.id, created.splice(0)));
}

export async function closeDatabase() {
  await removeCreatedUsers();
  await closeDb();
}

/** A request to the test server that does not follow redirects. */
export function get(path: string, cookie?: string) {
  return fetch(baseUrl + path, { redirect: "manual", headers: cookie ? { Cookie: cookie } : {} });
}

export function postForm(path: string, fields: Record<string, string>, cookie?: string) {
  return fetch(baseUrl + path, {
    method: "POST",
    redirect: "manual",
    headers: { "Content-Type": "application/x-www-form-urlencoded", Origin: baseUrl, ...(cookie ? { Cookie: cookie } : {}) },
    body: new URLSearchParams(fields),
  });
}

export function postJson(path: string, body: unknown, headers: Record<string, string> = {}) {
  return fetch(baseUrl + path, {
    method: "POST",
    headers: { "Content-Type": "application/json", ...headers },
    body: typeof body === "string" ? body : JSON.stringify(body),
  });
}

function redirectId(res: Response, prefix: string): string {
  const loc = res.headers.get("location") ?? "";
  const m = new RegExp(`^${prefix}([0-9a-f-]{36})$`).exec(loc);
  if (!m) throw new Error(`expected a redirect to ${prefix}…, got ${res.status} ${loc}`);
  return m[1];
}

/**
 * Publishes a new i.i.d. model the way users do: `author` saves an item with each distribution in
 * turn and proposes it, `curator` accepts; one edition per distribution. Returns the slug.
 */
export async function publishThroughReview(author: TestUser, curator: TestUser, slug: string, distributions: number[][]): Promise<string> {
  const iid = (p: number[]) => JSON.stringify({ family: "iid", alphabet: p.map((_, i) => `s${i}`), p });
  for (const [n, p] of distributions.entries()) {
    let itemId: string;
    if (n === 0) itemId = redirectId(await postForm("/workspace/new", { intent: "create", family: "iid", title: `Fixture ${slug}` }, author.cookie), "/workspace/");
    else itemId = redirectId(await postForm("/workspace/new", { intent: "clone", slug, edition: String(n) }, author.cookie), "/workspace/");
    const saved = await postForm(`/workspace/${itemId}`, { intent: "save", revision: "1", title: `Fixture ${slug}`, notes: "", params: iid(p) }, author.cookie);
    if (saved.status !== 200) throw new Error(`saving the fixture item answered ${saved.status}`);
    const form: Record<string, string> = n === 0 ? { kind: "new-model", changeNote: "Fixture", slug, title: `Fixture ${slug}`, summary: "A fixture model for the tests.", tags: "fixture" } : { kind: "new-edition", changeNote: `Fixture edition ${n + 1}` };
    const proposalId = redirectId(await postForm(`/workspace/${itemId}/submit`, form, author.cookie), "/workspace/proposals/");
    const accepted = await postForm(`/review/${proposalId}`, { intent: "decide", decision: "accept", note: "Fixture" }, curator.cookie);
    if (accepted.status !== 302) throw new Error(`accepting the fixture proposal answered ${accepted.status}: ${await accepted.text()}`);
  }
  return slug;
}
