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
