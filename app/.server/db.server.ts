/**
 * The database: one pg pool and one Drizzle instance per server process, created on first use.
 */
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { env } from "./env.server";
import * as schema from "./schema";

export type Database = NodePgDatabase<typeof schema>;

let pool: pg.Pool | undefined;
let database: Database | undefined;

/** The shared Drizzle instance. */
export function db(): Database {
  if (!database) {
    pool = new pg.Pool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: 3000 });
    // A dropped connection must not crash the server; the next query reports the error.
    pool.on("error", () => {});
    database = drizzle(pool, { schema });
  }
  return database;
}

/** Whether the database answers `select 1` within the timeout. Never throws. */
export async function databaseAnswers(timeoutMs = 2000): Promise<boolean> {
  try {
    db();
    const client = await Promise.race([
      pool!.connect(),
      new Promise<never>((_, reject) => setTimeout(() => reject(new Error("timeout")), timeoutMs)),
    ]);
    try {
      await client.query("select 1");
      return true;
    } finally {
      client.release();
    }
  } catch {
    return false;
  }
}

export { schema };

/** Ends the pool (scripts and tests, so the process can exit). */
export async function closeDb(): Promise<void> {
  if (pool) await pool.end();
  pool = undefined;
  database = undefined;
}
