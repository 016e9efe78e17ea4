// The seed refuses a bad catalogue file: the error names the file and the reason, and nothing of
// that run is saved, because the whole run is one transaction. Each case uses a temporary folder
// holding one good file and one bad file, with random slugs so reruns never collide.
import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { eq, inArray } from "drizzle-orm";
import { afterAll, describe, expect, it, vi } from "vitest";
import { CatalogError, loadCatalog, seedCatalog } from "~/.server/catalog.server";
import { db } from "~/.server/db.server";
import { editions, models } from "~/.server/schema";

// Marks the parameters whose verification the engine is made to report as failed (below).
const VERIFICATION_PROBE = "verification-probe";

// A valid model never fails verification, so that refusal is reached by reporting one check as
// failed for a model carrying the probe label; every other model is computed by the real engine.
vi.mock(import("~/engine"), async (importOriginal) => {
  const engine = await importOriginal();
  return {
    ...engine,
    computeFigures: ((request: { model?: { alphabet?: unknown[] } }) => {
      const result = engine.computeFigures(request);
      const model = request.model ?? {};
      if (!model.alphabet?.includes(VERIFICATION_PROBE)) return result;
      const checks = result.verification.checks.map((c, i) => (i === 0 ? { ...c, passed: false } : c));
      return { ...result, verification: { ...result.verification, passed: false, checks } };
    }) as typeof engine.computeFigures,
  };
});

const suffix = () => randomBytes(4).toString("hex");
const folders: string[] = [];
const insertedSlugs: string[] = [];

afterAll(async () => {
  for (const dir of folders) rmSync(dir, { recursive: true, force: true });
  // Editions cannot be deleted (a database guard), so models this file published stay, marked
  // synthetic so the library leaves them out.
  if (insertedSlugs.length) await db().update(models).set({ isSynthetic: true }).where(inArray(models.slug, insertedSlugs));
});

function twoState(slug: string, a = 0.12, alphabet: string[] = ["calm", "swell"]) {
  return {
    slug,
    title: `Seed check ${slug}`,
    family: "two-state",
    summary: "A two-state sea-state chain used to check the seed.",
    tags: ["test"],
    provenance: "Written by the seed test.",
    methods: ["two-state-closed-form"],
    editions: [{ note: "First edition.", publishedAt: "2026-01-05", params: { family: "two-state", alphabet, a, b: 0.3 } }],
  };
}

/** A temporary catalogue folder; `files` maps file names to contents (a string is written as is). */
function folder(files: Record<string, unknown>): string {
  const dir = mkdtempSync(path.join(tmpdir(), "ergoshelf-seed-"));
  folders.push(dir);
  for (const [name, content] of Object.entries(files)) {
    writeFileSync(path.join(dir, name), typeof content === "string" ? content : JSON.stringify(content, null, 2));
  }
  return dir;
}

async function modelExists(slug: string): Promise<boolean> {
  const rows = await db().select({ id: models.id }).from(models).where(eq(models.slug, slug));
  return rows.length > 0;
}

/** Runs the seed on the folder and returns the CatalogError it must throw. */
async function refusal(dir: string): Promise<CatalogError> {
  const error = await seedCatalog(dir).then(
    () => null,
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(CatalogError);
  return error as CatalogError;
}

describe("seedCatalog refuses a bad file and saves nothing of the run", () => {
  const cases: { what: string; bad: (slug: string) => unknown; reason: RegExp }[] = [
    {
      what: "a transition row that does not sum to 1",
      bad: (slug) => ({
        ...twoState(slug),
        family: "markov",
        editions: [{ note: "n", publishedAt: "2026-01-05", params: { family: "markov", alphabet: ["calm", "swell"], order: 1, P: [[0.9, 0.1], [0.3, 0.6]] } }],
      }),
      reason: /edition 1: P\[1\]: row 1 \("swell"\) sums to 0\.9, not 1/,
    },
    {
      what: "a slug that does not match the file name",
      bad: () => twoState(`other-${suffix()}`),
      reason: /slug "other-[0-9a-f]+" does not match the file name "zz-bad-[0-9a-f]+\.json"/,
    },
    { what: "an unknown family", bad: (slug) => ({ ...twoState(slug), family: "renewal" }), reason: /^family: .*expected one of/ },
    { what: "a file that is not JSON", bad: () => '{ "slug": "broken", ', reason: /^not valid JSON/ },
    {
      what: "an edition whose verification fails",
      bad: (slug) => twoState(slug, 0.12, ["calm", VERIFICATION_PROBE]),
      reason: /^edition 1: verification failed for \S+/,
    },
  ];

  for (const { what, bad, reason } of cases) {
    it(`refuses ${what}`, async () => {
      const good = `aa-good-${suffix()}`;
      const badName = `zz-bad-${suffix()}`;
      const dir = folder({ [`${good}.json`]: twoState(good), [`${badName}.json`]: bad(badName) });

      await expect(loadCatalog(dir)).rejects.toBeInstanceOf(CatalogError);
      const error = await refusal(dir);
      expect(error.file).toBe(`${badName}.json`);
      expect(error.reason).toMatch(reason);
      expect(error.message).toBe(`${badName}.json: ${error.reason}`);
      expect(await modelExists(good)).toBe(false);
      expect(await modelExists(badName)).toBe(false);
    });
  }

  it("seeds a good folder (the control for the cases above)", async () => {
    const slug = `seed-ok-${suffix()}`;
    insertedSlugs.push(slug);
    const result = await seedCatalog(folder({ [`${slug}.json`]: twoState(slug) }));
    expect(result).toEqual({ models: 1, addedModels: 1, addedEditions: 1 });
    expect(await modelExists(slug)).toBe(true);
  });

  it("rolls back models inserted earlier in the same run when a later file changes a published edition", async () => {
    const published = `zz-published-${suffix()}`;
    insertedSlugs.push(published);
    await seedCatalog(folder({ [`${published}.json`]: twoState(published, 0.12) }));
    await db().update(models).set({ isSynthetic: true }).where(eq(models.slug, published));

    const fresh = `aa-fresh-${suffix()}`;
    const dir = folder({ [`${fresh}.json`]: twoState(fresh), [`${published}.json`]: twoState(published, 0.2) });
    // Both files are valid on their own; the refusal comes from the database, inside the transaction.
    expect(await loadCatalog(dir)).toHaveLength(2);
    const error = await refusal(dir);
    expect(error.file).toBe(`${published}.json`);
    expect(error.reason).toMatch(/edition 1 is already published with other parameters/);
    expect(await modelExists(fresh)).toBe(false);

    const [model] = await db().select({ id: models.id }).from(models).where(eq(models.slug, published));
    const stored = await db().select({ params: editions.params }).from(editions).where(eq(editions.modelId, model.id));
    expect(stored).toEqual([{ params: { family: "two-state", alphabet: ["calm", "swell"], a: 0.12, b: 0.3 } }]);
  });
});
