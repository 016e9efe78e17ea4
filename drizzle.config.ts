import { defineConfig } from "drizzle-kit";

// Only `drizzle-kit generate` is used (it needs no database); migrations are applied by
// scripts/migrate.ts with drizzle-orm's migrator.
export default defineConfig({
  dialect: "postgresql",
  schema: "./app/.server/schema.ts",
  out: "./drizzle",
});
