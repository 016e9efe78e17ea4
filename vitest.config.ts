import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

// Unit and reference checks are pure and run in parallel; integration tests share one
// PostgreSQL and run in their own project (see scripts/test.sh).
export default defineConfig({
  resolve: { alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) } },
  test: {
    projects: [
      { extends: true, test: { name: "unit", include: ["tests/unit/**/*.test.ts", "app/**/*.test.ts"] } },
      { extends: true, test: { name: "reference", include: ["tests/reference/**/*.test.ts"] } },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          fileParallelism: false,
          setupFiles: ["tests/integration/setup.ts"],
          testTimeout: 30000,
          hookTimeout: 60000,
        },
      },
    ],
  },
});
