// The read-only library API: shapes, errors, and the cache validators of editions.
import { createHash, randomBytes } from "node:crypto";
import canonicalize from "canonicalize";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { editions, models } from "~/.server/schema";
import { get } from "./fixtures";

const json = async (path: string, headers: Record<string, string> = {}) => {
  const res = await fetch(`${process.env.ERGOSHELF_TEST_BASE_URL}${path}`, { headers });
  return { res, body: res.status === 304 ? null : await res.json() };
};

describe("GET /api/v1/models", () => {
  it("pages through the library with links", async () => {
    const { res, body } = await json("/api/v1/models?pageSize=5&sort=title");
    expect(res.status).toBe(200);
    expect(body.total).toBeGreaterThanOrEqual(36); // the catalogue's 36 models
    expect(body.models).toHaveLength(5);
    expect(body.pages).toBe(Math.ceil(body.total / 5));
    const titles = body.models.map((m: { title: string }) => m.title);
    expect(titles).toEqual([...titles].sort((a: string, b: string) => a.localeCompare(b, "en", { sensitivity: "base", numeric: true })));
    const first = body.models[0];
    expect(first).toMatchObject({ citationKey: `ergoshelf:${first.slug}@${first.latestEdition}`, links: { self: `/api/v1/models/${first.slug}` } });
    expect(Number.isNaN(Date.parse(first.updatedAt))).toBe(false);
    expect(body.links.prev).toBeNull();
    const next = await json(body.links.next);
    expect(next.body.page).toBe(2);
    expect(next.body.models[0].slug).not.toBe(first.slug);
  });

  it("answers 400 naming the parameter for bad input", async () => {
    const { res, body } = await json("/api/v1/models?pageSize=1000");
    expect(res.status).toBe(400);
    expect(body.error.issues).toEqual([expect.objectContaining({ path: "pageSize" })]);
  });
});

describe("GET /api/v1/models/:slug", () => {
  it("lists the editions oldest first, with a retraction and the latest standing edition", async () => {
    const { res, body } = await json("/api/v1/models/ro-bits-order3");
    expect(res.status).toBe(200);
    expect(body.model).toMatchObject({ slug: "ro-bits-order3", family: "markov" });
    expect(body.model.id).toBeUndefined();
    // catalog/ro-bits-order3.json: three editions, the second retracted.
    expect(body.editions.map((e: { number: number }) => e.number)).toEqual([1, 2, 3]);
    expect(body.editions[1].retraction.reason).toMatch(/FIFO/);
    expect(body.editions[0].retraction).toBeNull();
    expect(body.latestEdition).toBe(3);
    expect(body.links.latest).toBe("/api/v1/models/ro-bits-order3/editions/3");
    expect(body.editions[2].citationKey).toBe("ergoshelf:ro-bits-order3@3");
  });

  it("answers 404 JSON for an unknown slug", async () => {
    const { res, body } = await json("/api/v1/models/no-such-model-here");
    expect(res.status).toBe(404);
    expect(body.error.message).toMatch(/no-such-model-here/);
  });
});

describe("GET /api/v1/models/:slug/editions/:n", () => {
  it("gives parameters, figures, verification and a content hash that is SHA-256 of the RFC 8785 JSON of the parameters", async () => {
    const { res, body } = await json("/api/v1/models/ro-bits-lag-one/editions/1");
    expect(res.status).toBe(200);
    expect(body).toMatchObject({
      number: 1,
      retraction: null,
      citationKey: "ergoshelf:ro-bits-lag-one@1",
      url: "/library/ro-bits-lag-one/e/1",
      params: { family: "two-state", a: 0.5212, b: 0.5064 }, // catalog/ro-bits-lag-one.json
    });
    expect(typeof body.engineVersion).toBe("string");
    expect(body.verification.passed).toBe(true);
    expect(body.figures.entropyRate.bits).toBeGreaterThan(0.99);
    // Canonical JSON by the `canonicalize` package (RFC 8785), hashed by node:crypto.
    const expected = createHash("sha256").update(canonicalize(body.params)!).digest("hex");
    expect(body.contentHash).toBe(expected);
    expect(res.headers.get("etag")).toBe(`"${expected}-standing"`);
    expect(res.headers.get("cache-control")).toBe("public, max-age=300");
  });

  it("answers 304 to a matching If-None-Match, also in a list or weak form, and 200 to another", async () => {
    const { res } = await json("/api/v1/models/ro-bits-lag-one/editions/1");
    const etag = res.headers.get("etag")!;
    const same = await json("/api/v1/models/ro-bits-lag-one/editions/1", { "If-None-Match": etag });
    expect(same.res.status).toBe(304);
    expect(same.res.headers.get("etag")).toBe(etag);
    expect((await json("/api/v1/models/ro-bits-lag-one/editions/1", { "If-None-Match": `"x", W/${etag}` })).res.status).toBe(304);
    expect((await json("/api/v1/models/ro-bits-lag-one/editions/1", { "If-None-Match": '"something-else"' })).res.status).toBe(200);
  });

  it("marks a retracted edition in its ETag and body", async () => {
    const { res, body } = await json("/api/v1/models/ro-bits-order3/editions/2");
    expect(res.status).toBe(200);
    expect(body.retraction).toMatchObject({ reason: expect.stringMatching(/FIFO/) });
    expect(res.headers.get("etag")).toBe(`"${body.contentHash}-retracted"`);
  });

  it("answers 400 for an edition that is not a whole number and 404 for one that does not exist", async () => {
    for (const bad of ["1.5", "abc", "-1", "1e3"]) {
      const r = await json(`/api/v1/models/ro-bits-lag-one/editions/${bad}`);
      expect(r.res.status, bad).toBe(400);
      expect(r.body.error.issues[0].path).toBe("edition");
    }
    for (const path of ["/api/v1/models/ro-bits-lag-one/editions/99", "/api/v1/models/ro-bits-lag-one/editions/99999999999", "/api/v1/models/no-such-model/editions/1"]) {
      const r = await json(path);
      expect(r.res.status, path).toBe(404);
      expect(r.body.error.message).toBeTruthy();
    }
  });
});

describe("a retraction changes an edition's ETag", () => {
  // A model of this file's own, in the library for the test and marked synthetic afterwards, so the
  // library stops showing it (editions cannot be deleted).
  const slug = `api-etag-${randomBytes(4).toString("hex")}`;
  let editionId = "";
  beforeAll(async () => {
    const params = { family: "iid", alphabet: ["0", "1"], p: [0.5, 0.5] };
    const [model] = await db().insert(models).values({ slug, title: "ETag check", family: "iid", summary: "A test model.", isSynthetic: false }).returning();
    const [ed] = await db()
      .insert(editions)
      .values({ modelId: model.id, number: 1, params, contentHash: createHash("sha256").update(canonicalize(params)!).digest("hex"), figures: {}, verification: {}, engineVersion: "test" })
      .returning();
    editionId = ed.id;
  });
  afterAll(async () => {
    await db().update(models).set({ isSynthetic: true, updatedAt: sql`now()` }).where(eq(models.slug, slug));
  });

  it("gives a new ETag, so a cached copy is not confirmed", async () => {
    const before = await get(`/api/v1/models/${slug}/editions/1`);
    const etag = before.headers.get("etag")!;
    expect(etag).toMatch(/-standing"$/);
    await db().update(editions).set({ retractedAt: new Date(), retractionReason: "test retraction" }).where(eq(editions.id, editionId));
    const after = await fetch(`${process.env.ERGOSHELF_TEST_BASE_URL}/api/v1/models/${slug}/editions/1`, { headers: { "If-None-Match": etag } });
    expect(after.status).toBe(200);
    expect(after.headers.get("etag")).toMatch(/-retracted"$/);
    expect((await after.json()).retraction.reason).toBe("test retraction");
  });
});

describe("synthetic scale-test models", () => {
  // Models from `npm run seed:synthetic` exist for benchmarks only: every page and API answer
  // treats them as unknown. This one is the file's own, synthetic from the start.
  const slug = `api-synthetic-${randomBytes(4).toString("hex")}`;
  beforeAll(async () => {
    const params = { family: "iid", alphabet: ["0", "1"], p: [0.25, 0.75] };
    const [model] = await db().insert(models).values({ slug, title: "Synthetic check", family: "iid", summary: "A test model.", isSynthetic: true }).returning();
    await db()
      .insert(editions)
      .values({ modelId: model.id, number: 1, params, contentHash: createHash("sha256").update(canonicalize(params)!).digest("hex"), figures: {}, verification: {}, engineVersion: "test" });
  });

  it("answers 404 on the API, as for an unknown slug", async () => {
    for (const path of [`/api/v1/models/${slug}`, `/api/v1/models/${slug}/editions/1`]) {
      const r = await json(path);
      expect(r.res.status, path).toBe(404);
      expect(r.body.error.message, path).toMatch(/has no (model|edition)/);
    }
  });
  it("answers 404 on the model page and its permalink", async () => {
    for (const path of [`/library/${slug}`, `/library/${slug}/e/1`]) {
      const res = await fetch(`${process.env.ERGOSHELF_TEST_BASE_URL}${path}`);
      expect(res.status, path).toBe(404);
    }
  });
  it("is left out of the model list", async () => {
    const r = await json(`/api/v1/models?q=${encodeURIComponent("Synthetic check")}&pageSize=100`);
    expect(r.res.status).toBe(200);
    expect(JSON.stringify(r.body)).not.toContain(slug);
  });
});
