/**
 * The environment, validated once at start-up. Only `publicEnv` reaches the browser.
 */
import { z } from "zod";

const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().url({ message: "DATABASE_URL must be a postgres:// URL (npm start and npm test set it)" }),
  SESSION_SECRET: z.string().min(16, "SESSION_SECRET must be at least 16 characters"),
  ERGOSHELF_DEMO: z.enum(["0", "1"]).default("0"),
  ERGOSHELF_BASE_URL: z.string().url().optional(),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().positive().optional(),
  ERGOSHELF_MAIL_FAKE: z.enum(["0", "1"]).default("0"),
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

/** The validated environment; throws a readable error naming each bad variable. */
export function env(): Env {
  if (cached) return cached;
  const parsed = envSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Ergoshelf cannot start; fix the environment:\n${lines.join("\n")}`);
  }
  cached = parsed.data;
  return cached;
}

/** Demo accounts sign in only outside production, or when ERGOSHELF_DEMO=1 says so. */
export function demoAccountsAllowed(): boolean {
  const e = env();
  return e.NODE_ENV !== "production" || e.ERGOSHELF_DEMO === "1";
}

/** The named subset of settings the browser may see. */
export function publicEnv() {
  const e = env();
  return { demo: e.ERGOSHELF_DEMO === "1" || e.NODE_ENV !== "production", mailFake: e.ERGOSHELF_MAIL_FAKE === "1" };
}
export type PublicEnv = ReturnType<typeof publicEnv>;
