/**
 * Server-side sessions. The cookie holds only a random session id; the database holds its
 * SHA-256, the user and the expiry, so a role change or a disabled account takes effect at once.
 */
import { createHash, randomBytes } from "node:crypto";
import { and, eq, gt } from "drizzle-orm";
import { createCookie } from "react-router";
import { db } from "./db.server";
import { env } from "./env.server";
import { sessions, users } from "./schema";
import type { Role, SessionUser } from "~/permissions";

const SESSION_DAYS = 14;

let cookie: ReturnType<typeof createCookie> | undefined;
function sessionCookie() {
  if (!cookie) {
    cookie = createCookie("ergoshelf_session", {
      httpOnly: true,
      sameSite: "lax",
      secure: env().NODE_ENV === "production",
      path: "/",
      secrets: [env().SESSION_SECRET],
      maxAge: SESSION_DAYS * 24 * 3600,
    });
  }
  return cookie;
}

export function hashSessionId(id: string): string {
  return createHash("sha256").update(id).digest("hex");
}

/** Reads the session id from the request's cookie, or null. */
async function sessionIdFrom(request: Request): Promise<string | null> {
  const value = await sessionCookie().parse(request.headers.get("Cookie"));
  return typeof value === "string" && value.length >= 32 ? value : null;
}

/** The signed-in, enabled user of this request, or null for a visitor. */
export async function getSessionUser(request: Request): Promise<SessionUser | null> {
  const id = await sessionIdFrom(request);
  if (!id) return null;
  const rows = await db()
    .select({ id: users.id, email: users.email, name: users.name, role: users.role, disabled: users.disabled })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .where(and(eq(sessions.idHash, hashSessionId(id)), gt(sessions.expiresAt, new Date())))
    .limit(1);
  const row = rows[0];
  if (!row || row.disabled) return null;
  return { id: row.id, email: row.email, name: row.name, role: row.role as Role };
}

/**
 * Starts a new session for the user (a fresh id on every sign-in, so a planted id is useless)
 * and ends the request's old one. Returns the Set-Cookie header value.
 */
export async function startSession(request: Request, userId: string): Promise<string> {
  const old = await sessionIdFrom(request);
  if (old) await db().delete(sessions).where(eq(sessions.idHash, hashSessionId(old)));
  const id = randomBytes(32).toString("base64url");
  await db()
    .insert(sessions)
    .values({ idHash: hashSessionId(id), userId, expiresAt: new Date(Date.now() + SESSION_DAYS * 86400_000) });
  return sessionCookie().serialize(id);
}

/** Deletes the request's session row and returns a Set-Cookie header that clears the cookie. */
export async function endSession(request: Request): Promise<string> {
  const id = await sessionIdFrom(request);
  if (id) await db().delete(sessions).where(eq(sessions.idHash, hashSessionId(id)));
  return sessionCookie().serialize("", { maxAge: 0 });
}

/** Creates a session directly (test fixtures); returns the Cookie header a client would send. */
export async function createSessionCookieHeader(userId: string): Promise<string> {
  const id = randomBytes(32).toString("base64url");
  await db()
    .insert(sessions)
    .values({ idHash: hashSessionId(id), userId, expiresAt: new Date(Date.now() + SESSION_DAYS * 86400_000) });
  const setCookie = await sessionCookie().serialize(id);
  return setCookie.split(";")[0];
}
