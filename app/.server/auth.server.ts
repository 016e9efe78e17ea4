/**
 * Sign-in (remix-auth's form strategy, bcryptjs hashes) and the layered server checks:
 * getUser → requireUser → requireRole / requirePermission, each throwing a redirect, 401 or 403.
 */
import bcrypt from "bcryptjs";
import { sql } from "drizzle-orm";
import { data, redirect } from "react-router";
import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { z } from "zod";
import { can, hasRole, type Action, type Role, type SessionUser } from "~/permissions";
import { db } from "./db.server";
import { demoAccountsAllowed } from "./env.server";
import { auditLog, users } from "./schema";
import { getSessionUser } from "./session.server";

export const BCRYPT_COST = 12;

/** A sign-in refusal whose message is safe to show. */
export class SignInError extends Error {}

const WRONG_CREDENTIALS = "That e-mail and password do not match an account. Check both and try again.";

const credentialsSchema = z.object({
  email: z.string().trim().min(1, "Enter your e-mail address.").max(320).email("Enter a valid e-mail address."),
  password: z.string().min(1, "Enter your password.").max(1024),
});

// A fixed hash to compare against when the e-mail is unknown, so both cases take as long.
const DUMMY_HASH = bcrypt.hashSync("ergoshelf-timing-equaliser", BCRYPT_COST);

export async function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

/** Checks an e-mail and password; returns the user or throws SignInError. */
export async function verifyCredentials(input: { email: unknown; password: unknown }, ip?: string): Promise<SessionUser> {
  const parsed = credentialsSchema.safeParse(input);
  if (!parsed.success) throw new SignInError(parsed.error.issues[0].message);
  const { email, password } = parsed.data;
  const rows = await db()
    .select()
    .from(users)
    .where(sql`lower(${users.email}) = lower(${email})`)
    .limit(1);
  const user = rows[0];
  const matches = await bcrypt.compare(password, user?.passwordHash ?? DUMMY_HASH);
  if (!user || !matches) {
    await db()
      .insert(auditLog)
      .values({ actorId: user?.id ?? null, action: "sign-in.failed", target: email.toLowerCase(), details: { ip: ip ?? null } });
    throw new SignInError(WRONG_CREDENTIALS);
  }
  if (user.disabled) throw new SignInError("This account is disabled. Ask an administrator to enable it.");
  if (user.isDemo && !demoAccountsAllowed()) {
    throw new SignInError("Demo accounts are turned off on this server (set ERGOSHELF_DEMO=1 to allow them).");
  }
  return { id: user.id, email: user.email, name: user.name, role: user.role as Role };
}

export const authenticator = new Authenticator<SessionUser>();
authenticator.use(
  new FormStrategy(async ({ form, request }) =>
    verifyCredentials(
      { email: form.get("email"), password: form.get("password") },
      request.headers.get("x-forwarded-for") ?? undefined,
    ),
  ),
  "form",
);

/** The signed-in user, or null for a visitor. */
export async function getUser(request: Request): Promise<SessionUser | null> {
  return getSessionUser(request);
}

/** The signed-in user; a visitor is redirected to sign-in (and back here afterwards). */
export async function requireUser(request: Request, opts: { redirectTo?: string } = {}): Promise<SessionUser> {
  const user = await getSessionUser(request);
  if (!user) {
    const url = new URL(request.url);
    const back = opts.redirectTo ?? url.pathname + url.search;
    throw redirect(`/sign-in?redirectTo=${encodeURIComponent(back)}`);
  }
  return user;
}

/** As requireUser, for API routes: a visitor gets 401 JSON instead of a redirect. */
export async function requireApiUser(request: Request): Promise<SessionUser> {
  const user = await getSessionUser(request);
  if (!user) throw data({ error: { message: "Sign in to use this endpoint.", issues: [] } }, { status: 401 });
  return user;
}

function forbidden(message: string): never {
  throw data({ message }, { status: 403, statusText: "Forbidden" });
}

/** The signed-in user holding at least `role`; a visitor is sent to sign-in, anyone else gets 403. */
export async function requireRole(request: Request, role: Role): Promise<SessionUser> {
  const user = await requireUser(request);
  if (!hasRole(user, role)) forbidden(`This area is for ${role}s. Your account is a ${user.role}.`);
  return user;
}

/** The signed-in user allowed to perform `action`; 403 otherwise. */
export async function requirePermission(request: Request, action: Action): Promise<SessionUser> {
  const user = await requireUser(request);
  if (!can(user, action)) forbidden("Your account may not do this.");
  return user;
}

export const requireContributor = (request: Request) => requireRole(request, "contributor");
export const requireCurator = (request: Request) => requireRole(request, "curator");
export const requireAdmin = (request: Request) => requireRole(request, "admin");
