// Library search through GET /api/v1/search: ranking, typos, prefixes, filters and facet counts.
// Words come from the catalogue (catalog/*.json), which every test database holds.
import { randomBytes } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { editions, models } from "~/.server/schema";

type Row = { slug: string; family: string; states: number | null; entropyRateBits: number | null; score: number | null };

async function search(qs: string) {
  const res = await fetch(`${process.env.ERGOSHELF_TEST_BASE_URL}/api/v1/search?${qs}`);
  return { status: res.status, body: await res.json() };
}

describe("ranking", () => {
  // "optocoupler" appears in one catalogue summary only: modem-line-state-optocoupler.json.
  it("puts the model whose summary has the word first", async () => {
    const { status, body } = await search("q=optocoupler");
    expect(status).toBe(200);
    expect(body.rows[0].slug).toBe("modem-line-state-optocoupler");
    expect(body.rows[0].score).toBeGreaterThan(0);
  });
  it("still finds it with a typo", async () => {
    const { body } = await search("q=optocuopler");
    expect(body.rows[0]?.slug).toBe("modem-line-state-optocoupler");
  });
  it("finds it from a prefix", async () => {
    const { body } = await search("q=optocou");
    expect(body.rows[0]?.slug).toBe("modem-line-state-optocoupler");
  });
  it("ranks a title match above summary-only matches", async () => {
    // "trolley" is in the cold-store loop walk's summary only; "Dunlin" is in five titles.
    const { body } = await search("q=dunlin");
    expect(body.total).toBeGreaterThanOrEqual(5);
    expect(body.rows.slice(0, 5).every((r: Row) => r.slug.startsWith("dunlin-"))).toBe(true);
  });
  it("requires every word when some model has them all", async () => {
    const { body } = await search("q=ring+oscillator+thermal");
    expect(body.rows[0].slug).toBe("ro-bits-thermal-regimes");
    expect(body.total).toBeLessThan((await search("q=ring+oscillator")).body.total);
  });
});

describe("filters", () => {
  it("keeps only the families asked for", async () => {
    const { body } = await search("family=graph-walk&pageSize=100");
    expect(body.total).toBeGreaterThanOrEqual(7); // seven graph-walk files in catalog/
    expect(body.rows.every((r: Row) => r.family === "graph-walk")).toBe(true);
    expect(body.rows.map((r: Row) => r.slug)).toContain("dunlin-floor-walk");
  });
  it("filters by state count", async () => {
    const { body } = await search("states=2&pageSize=100");
    expect(body.total).toBeGreaterThan(0);
    expect(body.rows.every((r: Row) => r.states === 2)).toBe(true);
    expect(body.rows.map((r: Row) => r.slug)).toContain("ro-bits-lag-one");
    const open = await search("states=17-&pageSize=100");
    expect(open.body.rows.every((r: Row) => (r.states ?? 0) >= 17)).toBe(true);
  });
  it("filters by entropy-rate range in bits/symbol", async () => {
    const { body } = await search("rate=0.99-1&pageSize=100");
    expect(body.rows.every((r: Row) => r.entropyRateBits !== null && r.entropyRateBits >= 0.99 && r.entropyRateBits <= 1)).toBe(true);
    // ro-bits-lag-one: 0.99930 bits/symbol from its closed form (catalog/ro-bits-lag-one.json).
    expect(body.rows.map((r: Row) => r.slug)).toContain("ro-bits-lag-one");
  });
  it("sorts by rate, missing rates last", async () => {
    const { body } = await search("sort=rate&dir=asc&pageSize=100");
    const rates = body.rows.map((r: Row) => r.entropyRateBits).filter((v: number | null) => v !== null);
    expect(rates).toEqual([...rates].sort((a: number, b: number) => a - b));
  });
  it("answers 400 with the parameter named for bad filters", async () => {
    const { status, body } = await search("states=lots&family=markoff");
    expect(status).toBe(400);
    expect(body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(["family", "states"]);
  });
});

describe("facet counts", () => {
  it("count families under the other filters, not the family filter itself", async () => {
    const all = await search("q=ring+oscillator&pageSize=100");
    const hidden = await search("q=ring+oscillator&family=hidden&pageSize=100");
    expect(hidden.body.rows.every((r: Row) => r.family === "hidden")).toBe(true);
    const count = (b: { facets: { family: { value: string; count: number }[] } }, f: string) => b.facets.family.find((x) => x.value === f)!.count;
    for (const f of ["iid", "markov", "two-state", "hidden"]) expect(count(hidden.body, f)).toBe(count(all.body, f));
    expect(count(hidden.body, "hidden")).toBe(hidden.body.total);
    const sum = all.body.facets.family.reduce((s: number, x: { count: number }) => s + x.count, 0);
    expect(sum).toBe(all.body.total);
  });
  it("count families under an active state filter", async () => {
    const { body } = await search("states=2");
    const byFamily = Object.fromEntries(body.facets.family.map((x: { value: string; count: number }) => [x.value, x.count]));
    const twoState = await search("states=2&family=two-state");
    expect(byFamily["two-state"]).toBe(twoState.body.total);
  });
  it("give the state and rate spans of the matches", async () => {
    const { body } = await search("q=ring+oscillator&pageSize=100");
    const states = body.rows.map((r: Row) => r.states).filter((v: number | null) => v !== null);
    expect(body.facets.states).toEqual({ min: Math.min(...states), max: Math.max(...states) });
    const tag = body.facets.tags.find((t: { value: string }) => t.value === "ring oscillator");
    expect(tag.count).toBe(body.rows.filter((r: Row & { tags: string[] }) => r.tags.includes("ring oscillator")).length);
  });
});

describe("freshness", () => {
  // A model of this test's own, shown to the library for the test and then marked synthetic
  // (editions cannot be deleted); published straight into the database, as another server would.
  const slug = `search-fresh-${randomBytes(4).toString("hex")}`;
  const word = `zq${randomBytes(4).toString("hex")}`;
  afterAll(async () => {
    await db().update(models).set({ isSynthetic: true, updatedAt: sql`now()` }).where(eq(models.slug, slug));
  });

  async function waitFor(check: () => Promise<boolean>) {
    for (let i = 0; i < 40; i++) {
      if (await check()) return true;
      await new Promise((r) => setTimeout(r, 250));
    }
    return false;
  }

  it("sees a model published by another process, and stops showing it once it is hidden", async () => {
    expect((await search(`q=${word}`)).body.total).toBe(0);
    const [model] = await db().insert(models).values({ slug, title: `Freshness check ${word}`, family: "iid", summary: "A test model.", isSynthetic: false }).returning();
    await db().insert(editions).values({ modelId: model.id, number: 1, params: { family: "iid", alphabet: ["0", "1"], p: [0.5, 0.5] }, contentHash: "test", figures: {}, verification: {}, engineVersion: "test" });
    expect(await waitFor(async () => (await search(`q=${word}`)).body.rows[0]?.slug === slug)).toBe(true);
    await db().update(models).set({ isSynthetic: true }).where(eq(models.id, model.id));
    expect(await waitFor(async () => (await search(`q=${word}`)).body.total === 0)).toBe(true);
  });
});
