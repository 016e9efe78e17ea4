// The three citation downloads over HTTP: status, type, file name, a body that parses, the
// permanent URL on the server's origin, 400/404 with a clear text message, and ETag/304.
// The model is created here, so the test does not depend on the seed's rows; afterwards it is
// marked synthetic, which takes it out of the library (editions cannot be deleted).
import { randomBytes } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { editions, models } from "~/.server/schema";
import { computeFigures } from "~/engine";
import { baseUrl, get } from "./fixtures";

const slug = `cite-check-${randomBytes(4).toString("hex")}`;
const title = "Tide gauge float & wire — Ærø 5% sample";
let entropyRateBits = 0;

beforeAll(async () => {
  const params = { family: "two-state" as const, alphabet: ["dry", "wet"], a: 0.2, b: 0.35 };
  const figures = computeFigures({ model: params });
  entropyRateBits = figures.entropyRate!.bits;
  const [model] = await db()
    .insert(models)
    .values({ slug, title, family: "two-state", summary: "Float gauge wet/dry state at Brannock Point.", isSynthetic: false })
    .returning();
  await db()
    .insert(editions)
    .values([1, 2].map((number) => ({
      modelId: model.id,
      number,
      params,
      contentHash: `${number}`.repeat(64),
      figures,
      verification: figures.verification,
      engineVersion: figures.engineVersion,
      note: `Edition ${number}.`,
      publishedAt: new Date(`2026-0${number + 2}-10T12:00:00Z`),
    })));
});

afterAll(async () => {
  await db().update(models).set({ isSynthetic: true }).where(eq(models.slug, slug));
});

const formats = [
  { path: "cite.bib", type: "application/x-bibtex; charset=utf-8", ext: "bib" },
  { path: "cite.ris", type: "application/x-research-info-systems; charset=utf-8", ext: "ris" },
  { path: "cite.json", type: "application/vnd.citationstyles.csl+json; charset=utf-8", ext: "json" },
];
const permanentUrl = `${new URL(baseUrl).origin}/library/${slug}/e/2`;

describe("citation downloads", () => {
  for (const f of formats) {
    it(`serves ${f.path} with its type, file name and cache headers`, async () => {
      const res = await get(`/library/${slug}/e/2/${f.path}`);
      expect(res.status).toBe(200);
      expect(res.headers.get("content-type")).toBe(f.type);
      expect(res.headers.get("content-disposition")).toBe(`attachment; filename="ergoshelf-${slug}-e2.${f.ext}"`);
      expect(res.headers.get("cache-control")).toMatch(/public, max-age=\d+/);
      expect(res.headers.get("etag")).toMatch(/^"[0-9a-f]{16}"$/);
      const body = await res.text();
      expect(body).toContain(permanentUrl);
      expect(body).toContain(`ergoshelf:${slug}@2`);
    });
  }

  it("BibTeX: one @misc entry with the escaped title and the rate", async () => {
    const body = await (await get(`/library/${slug}/e/2/cite.bib`)).text();
    expect(body.startsWith(`@misc{ergoshelf:${slug}-e2,`)).toBe(true);
    expect(body).toContain("{{Tide gauge float \\& wire — Ærø 5\\% sample}, edition 2}");
    expect(body).toContain(`${Number(entropyRateBits.toPrecision(10))} bits/symbol`);
    expect(body).toMatch(/month\s+= apr,/);
  });

  it("RIS: CRLF lines, TY first, ER last, edition 1 dated March", async () => {
    const body = await (await get(`/library/${slug}/e/1/cite.ris`)).text();
    const lines = body.split("\r\n");
    expect(lines[0]).toBe("TY  - DATA");
    expect(lines.at(-2)).toBe("ER  - ");
    expect(lines).toContain("ET  - 1");
    expect(lines).toContain("DA  - 2026/03/10/");
  });

  it("CSL-JSON: parses to one dataset item", async () => {
    const items = await (await get(`/library/${slug}/e/2/cite.json?accessed=2026-05-02`)).json();
    expect(items).toHaveLength(1);
    expect(items[0]).toMatchObject({
      id: `ergoshelf:${slug}@2`,
      type: "dataset",
      title,
      version: "2",
      URL: permanentUrl,
      issued: { "date-parts": [[2026, 4, 10]] },
      accessed: { "date-parts": [[2026, 5, 2]] },
    });
  });

  it("answers 304 to a matching If-None-Match, and 200 to a stale one", async () => {
    const first = await get(`/library/${slug}/e/2/cite.ris`);
    const etag = first.headers.get("etag")!;
    await first.text();
    const again = await fetch(`${baseUrl}/library/${slug}/e/2/cite.ris`, { headers: { "If-None-Match": etag } });
    expect(again.status).toBe(304);
    expect(again.headers.get("etag")).toBe(etag);
    const stale = await fetch(`${baseUrl}/library/${slug}/e/2/cite.ris`, { headers: { "If-None-Match": '"0000000000000000"' } });
    expect(stale.status).toBe(200);
    await stale.text();
  });

  it("changes the ETag when the edition is retracted, and says so in the file", async () => {
    const before = await get(`/library/${slug}/e/1/cite.json`);
    const etag = before.headers.get("etag");
    await before.text();
    const [model] = await db().select({ id: models.id }).from(models).where(eq(models.slug, slug));
    await db()
      .update(editions)
      .set({ retractedAt: new Date(), retractionReason: "Citation test." })
      .where(and(eq(editions.modelId, model.id), eq(editions.number, 1)));
    const after = await get(`/library/${slug}/e/1/cite.json`);
    expect(after.headers.get("etag")).not.toBe(etag);
    const [item] = await after.json();
    expect(item.status).toBe("retracted");
  });

  it("answers 404 in plain text for an unknown model or edition", async () => {
    const noModel = await get(`/library/${slug}-missing/e/1/cite.bib`);
    expect(noModel.status).toBe(404);
    expect(noModel.headers.get("content-type")).toMatch(/^text\/plain/);
    expect(await noModel.text()).toMatch(/There is no model "cite-check-[0-9a-f]+-missing"/);
    const noEdition = await get(`/library/${slug}/e/9/cite.ris`);
    expect(noEdition.status).toBe(404);
    expect(await noEdition.text()).toMatch(/has no edition 9; it has editions 1, 2/);
  });

  it("answers 400 in plain text for an edition that is not a whole number, and for a bad access date", async () => {
    const res = await get(`/library/${slug}/e/two/cite.json`);
    expect(res.status).toBe(400);
    expect(res.headers.get("content-type")).toMatch(/^text\/plain/);
    expect(await res.text()).toMatch(/whole number/);
    const date = await get(`/library/${slug}/e/2/cite.json?accessed=2026-13-01`);
    expect(date.status).toBe(400);
    expect(await date.text()).toMatch(/YYYY-MM-DD/);
  });
});
