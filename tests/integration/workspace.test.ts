// The workspace over HTTP: create, clone, save, stale-revision refusal, restore, bad input, ownership, sign-in.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { workspaceItems, workspaceRevisions } from "~/.server/schema";
import { createUser, get, postForm, removeCreatedUsers, type TestUser } from "./fixtures";

let alice: TestUser;
let bob: TestUser;

beforeAll(async () => {
  alice = await createUser("contributor");
  bob = await createUser("contributor");
});
// Items go with their owners (ON DELETE CASCADE), revisions with their items.
afterAll(removeCreatedUsers);

function itemIdFrom(res: Response): string {
  const loc = res.headers.get("location") ?? "";
  const m = /^\/workspace\/([0-9a-f-]{36})$/.exec(loc);
  if (!m) throw new Error(`expected a redirect to an item, got ${res.status} ${loc}`);
  return m[1];
}

async function itemRow(id: string) {
  const [row] = await db().select().from(workspaceItems).where(eq(workspaceItems.id, id));
  return row;
}

async function revisionsOf(id: string) {
  return db().select().from(workspaceRevisions).where(eq(workspaceRevisions.itemId, id)).orderBy(workspaceRevisions.revision);
}

const markov = (P: number[][]) => JSON.stringify({ family: "markov", alphabet: ["calm", "swell"], order: 1, P });

describe("creating and cloning", () => {
  it("creates an item from the family's default model with revision 1", async () => {
    const res = await postForm("/workspace/new", { intent: "create", family: "two-state", title: "Uplink K02 bursts" }, alice.cookie);
    expect(res.status).toBe(302);
    const id = itemIdFrom(res);
    const row = await itemRow(id);
    expect(row).toMatchObject({ ownerId: alice.id, title: "Uplink K02 bursts", family: "two-state", revision: 1, sourceEditionId: null });
    expect((row.params as { family: string }).family).toBe("two-state");
    expect((await revisionsOf(id)).map((r) => r.revision)).toEqual([1]);
    const list = await (await get("/workspace", alice.cookie)).text();
    expect(list).toContain("Uplink K02 bursts");
  });

  it("clones an edition: its params, the title with (copy), and the source edition", async () => {
    const res = await postForm("/workspace/new", { intent: "clone", slug: "buoy-k05-sea-state-hourly", edition: "1" }, alice.cookie);
    const id = itemIdFrom(res);
    const row = await itemRow(id);
    expect(row.title).toMatch(/\(copy\)$/);
    expect(row.sourceEditionId).not.toBeNull();
    const edition = (await (await get("/api/v1/models/buoy-k05-sea-state-hourly/editions/1")).json()) as { params: unknown };
    expect(row.params).toEqual(edition.params);
    const list = await (await get("/workspace", alice.cookie)).text();
    expect(list).toContain("ergoshelf:buoy-k05-sea-state-hourly@1");
  });

  it("clones under the title the user gives, and the page shows the model and edition it came from", async () => {
    const res = await postForm("/workspace/new", { intent: "clone", slug: "buoy-k05-sea-state-hourly", edition: "1", title: "K05 refit for the winter report" }, alice.cookie);
    const id = itemIdFrom(res);
    expect((await itemRow(id)).title).toBe("K05 refit for the winter report");
    const page = await (await get(`/workspace/${id}`, alice.cookie)).text();
    expect(page).toContain('href="/library/buoy-k05-sea-state-hourly"');
    expect(page).toContain('href="/library/buoy-k05-sea-state-hourly/e/1"');
    // The owner is offered the way to a proposal.
    expect(page).toContain(`href="/workspace/${id}/submit"`);
  });

  it("refuses a clone title over the limit with 400 next to the field, and creates nothing", async () => {
    const before = (await db().select().from(workspaceItems).where(eq(workspaceItems.ownerId, bob.id))).length;
    const page = "/workspace/new?slug=buoy-k05-sea-state-hourly&edition=1";
    const res = await postForm(page, { intent: "clone", slug: "buoy-k05-sea-state-hourly", edition: "1", title: "x".repeat(201) }, bob.cookie);
    expect(res.status).toBe(400);
    expect(await res.text()).toMatch(/id="clone-title-error"[^>]*>.*a title has at most 200 characters/s);
    expect((await db().select().from(workspaceItems).where(eq(workspaceItems.ownerId, bob.id))).length).toBe(before);
  });

  it("refuses an unknown edition with 400 and creates nothing", async () => {
    const before = (await db().select().from(workspaceItems).where(eq(workspaceItems.ownerId, bob.id))).length;
    const res = await postForm("/workspace/new", { intent: "clone", slug: "no-such-model-here", edition: "1" }, bob.cookie);
    expect(res.status).toBe(400);
    expect(await res.text()).toContain("no such edition");
    expect((await db().select().from(workspaceItems).where(eq(workspaceItems.ownerId, bob.id))).length).toBe(before);
  });

  it("refuses a missing title with 400 and the message next to the field", async () => {
    const res = await postForm("/workspace/new", { intent: "create", family: "iid", title: "  " }, bob.cookie);
    expect(res.status).toBe(400);
    expect(await res.text()).toMatch(/id="title-error"[^>]*>.*a title is needed/s);
  });
});

describe("saving, conflicts and restoring", () => {
  let id: string;
  beforeAll(async () => {
    id = itemIdFrom(await postForm("/workspace/new", { intent: "create", family: "markov", title: "Sea state draft" }, alice.cookie));
  });

  it("saves as revision 2, records the revision and answers with the server's verified figures", async () => {
    const res = await postForm(`/workspace/${id}`, { intent: "save", revision: "1", title: "Sea state v2", notes: "refit", params: markov([[0.9, 0.1], [0.2, 0.8]]) }, alice.cookie);
    expect(res.status).toBe(200);
    // Two-state closed form (from memory): μ = (b, a)/(a + b) with a = 0.1, b = 0.2, so μ = (2/3, 1/3),
    // and H = μ₀·h(0.1) + μ₁·h(0.2) with h the binary entropy in bits: 0.468996·2/3 + 0.721928/3 = 0.553306 to six places.
    const h = (p: number) => -p * Math.log2(p) - (1 - p) * Math.log2(1 - p);
    const expected = ((2 / 3) * h(0.1) + (1 / 3) * h(0.2)).toFixed(6);
    expect(expected).toBe("0.553306");
    const body = (await res.text()).replace(/<!-- -->/g, "");
    expect(body).toMatch(new RegExp(`Server figures for revision 2:.*entropy rate ${expected}`, "s"));
    expect(body).toContain("verified by two routes");
    const row = await itemRow(id);
    expect(row.revision).toBe(2);
    expect(row.title).toBe("Sea state v2");
    expect((row.params as { P: number[][] }).P).toEqual([[0.9, 0.1], [0.2, 0.8]]);
    expect((await revisionsOf(id)).map((r) => [r.revision, r.title])).toEqual([[1, "Sea state draft"], [2, "Sea state v2"]]);
  });

  it("refuses a save made at a stale revision with 409 and saves nothing", async () => {
    const res = await postForm(`/workspace/${id}`, { intent: "save", revision: "1", title: "From an old tab", notes: "", params: markov([[0.5, 0.5], [0.5, 0.5]]) }, alice.cookie);
    expect(res.status).toBe(409);
    expect(await res.text()).toContain("This item was saved elsewhere at revision 2 after you opened revision 1; your changes were not saved");
    const row = await itemRow(id);
    expect(row.revision).toBe(2);
    expect(row.title).toBe("Sea state v2");
    expect((await revisionsOf(id)).length).toBe(2);
  });

  it("refuses invalid parameters with 400, names the row, and saves nothing", async () => {
    const res = await postForm(`/workspace/${id}`, { intent: "save", revision: "2", title: "Bad", notes: "", params: markov([[0.9, 0.1], [0.3, 0.8]]) }, alice.cookie);
    expect(res.status).toBe(400);
    const body = await res.text();
    expect(body).toContain("P[1]");
    expect(body).toContain("sums to 1.1");
    expect((await itemRow(id)).revision).toBe(2);
  });

  it("refuses a non-number entry with 400 naming the cell", async () => {
    const params = JSON.stringify({ family: "markov", alphabet: ["calm", "swell"], order: 1, P: [[0.9, "x"], [0.2, 0.8]] });
    const res = await postForm(`/workspace/${id}`, { intent: "save", revision: "2", title: "Bad", notes: "", params }, alice.cookie);
    expect(res.status).toBe(400);
    expect(await res.text()).toContain("P[0][1]");
    expect((await itemRow(id)).revision).toBe(2);
  });

  it("restores revision 1 into a new revision 3", async () => {
    const res = await postForm(`/workspace/${id}`, { intent: "restore", revision: "2", from: "1" }, alice.cookie);
    expect(res.status).toBe(200);
    const row = await itemRow(id);
    const [first] = await db().select().from(workspaceRevisions).where(and(eq(workspaceRevisions.itemId, id), eq(workspaceRevisions.revision, 1)));
    expect(row.revision).toBe(3);
    expect(row.title).toBe("Sea state draft");
    expect(row.params).toEqual(first.params);
    expect((await revisionsOf(id)).length).toBe(3);
  });

  it("answers 404 to another contributor, for reading, saving and deleting", async () => {
    expect((await get(`/workspace/${id}`, bob.cookie)).status).toBe(404);
    const save = await postForm(`/workspace/${id}`, { intent: "save", revision: "3", title: "Hijack", notes: "", params: markov([[1, 0], [0, 1]]) }, bob.cookie);
    expect(save.status).toBe(404);
    expect((await postForm(`/workspace/${id}`, { intent: "delete", confirm: "yes" }, bob.cookie)).status).toBe(404);
    expect((await itemRow(id)).title).toBe("Sea state draft");
    expect((await get("/workspace/00000000-0000-0000-0000-000000000000", alice.cookie)).status).toBe(404);
  });

  it("deletes only with the confirmation, then the item and its revisions are gone", async () => {
    expect((await postForm(`/workspace/${id}`, { intent: "delete" }, alice.cookie)).status).toBe(400);
    expect(await itemRow(id)).toBeDefined();
    const res = await postForm(`/workspace/${id}`, { intent: "delete", confirm: "yes" }, alice.cookie);
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe("/workspace");
    expect(await itemRow(id)).toBeUndefined();
    expect(await revisionsOf(id)).toEqual([]);
  });
});

describe("visitors", () => {
  for (const path of ["/workspace", "/workspace/new", "/workspace/00000000-0000-0000-0000-000000000000"]) {
    it(`are sent to sign-in from ${path}`, async () => {
      const res = await get(path);
      expect(res.status).toBe(302);
      expect(res.headers.get("location")).toBe(`/sign-in?redirectTo=${encodeURIComponent(path)}`);
    });
  }
});
