/**
 * The demo accounts, one per role, for development and tests. They are marked `is_demo`, and the
 * sign-in refuses them in production unless ERGOSHELF_DEMO=1.
 */
import { sql } from "drizzle-orm";
import { hashPassword } from "./auth.server";
import { db } from "./db.server";
import { users } from "./schema";

export const DEMO_PASSWORD = "ergoshelf-demo";
export const demoUsers = [
  { email: "admin@example.org", name: "Ada Okafor", role: "admin" },
  { email: "curator@example.org", name: "Tomás Lindqvist", role: "curator" },
  { email: "contributor@example.org", name: "Mei Hartmann", role: "contributor" },
] as const;

/** Inserts the demo accounts that do not exist yet; returns how many were added. */
export async function seedDemoUsers(): Promise<number> {
  let added = 0;
  for (const u of demoUsers) {
    const existing = await db().select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${u.email}`);
    if (existing.length) continue;
    await db().insert(users).values({ ...u, passwordHash: await hashPassword(DEMO_PASSWORD), isDemo: true });
    added++;
  }
  return added;
}
