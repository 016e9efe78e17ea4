// Integration tests run against the real PostgreSQL and the built server that scripts/test.sh
// starts; they refuse to run without them rather than fall back to anything else.
import { afterAll, beforeEach, expect, vi } from "vitest";

for (const name of ["DATABASE_URL", "SESSION_SECRET", "ERGOSHELF_TEST_BASE_URL"]) {
  if (!process.env[name]) throw new Error(`${name} is not set: run the integration tests through npm test`);
}

// console.error in a test is a failure unless the test expects it (it can mock console.error itself).
beforeEach(() => {
  const spy = vi.spyOn(console, "error");
  return () => {
    const calls = spy.mock.calls;
    spy.mockRestore();
    if (!vi.isMockFunction(console.error)) expect(calls, "console.error was called").toEqual([]);
  };
});

afterAll(async () => {
  const { closeDatabase } = await import("./fixtures");
  await closeDatabase();
});
