// Proposals and review over HTTP against the built server: who may do what (own vs any, author ≠
// reviewer), the state machine, one open proposal per item, publishing with the next edition number
// under a race, the audit log, the mail that each step sends, and bad input on every action
// (a clear message, nothing saved).
import { randomBytes } from "node:crypto";
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { and, eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db.server";
import { auditLog, editions, models, proposals, reviewComments } from "~/.server/schema";
import { createUser, get, postForm, removeCreatedUsers, type TestUser } from "./fixtures";

let author: TestUser;
let other: TestUser;
let curator: TestUser;
let curator2: TestUser;
let curatorAuthor: TestUser;
let admin: TestUser;

beforeAll(async () => {
  author = await createUser("contributor");
  other = await createUser("contributor");
  // Curators who publish stay: a published edition names its publisher for good.
  curator = await createUser("curator", { keep: true });
  curator2 = await createUser("curator", { keep: true });
  curatorAuthor = await createUser("curator");
  admin = await createUser("admin");
});

// Proposals (and their comments) go before their authors; published editions stay.
afterAll(async () => {
  const ids = [author, other, curator, curator2, curatorAuthor, admin].filter(Boolean).map((u) => u.id);
  await db().delete(proposals).where(inArray(proposals.authorId, ids));
  await removeCreatedUsers();
});

const mailDir = process.env.ERGOSHELF_MAIL_DIR;
const unique = () => randomBytes(4).toString("hex");
const iid = (p: number[], alphabet = p.map((_, i) => `s${i}`)) => JSON.stringify({ family: "iid", alphabet, p });

function locationId(res: Response, prefix: string): string {
  const loc = res.headers.get("location") ?? "";
  const m = new RegExp(`^${prefix}([0-9a-f-]{36})$`).exec(loc);
  if (!m) throw new Error(`expected a redirect to ${prefix}…, got ${res.status} ${loc}`);
  return m[1];
}

/** A new i.i.d. item owned by `user`, saved once with `p`; returns its id and revision. */
async function item(user: TestUser, p: number[]): Promise<{ id: string; revision: number }> {
  const id = locationId(await postForm("/workspace/new", { intent: "create", family: "iid", title: `Relay tally ${unique()}` }, user.cookie), "/workspace/");
  const res = await postForm(`/workspace/${id}`, { intent: "save", revision: "1", title: `Relay tally ${unique()}`, notes: "", params: iid(p) }, user.cookie);
  expect(res.status).toBe(200);
  return { id, revision: 2 };
}

async function save(user: TestUser, id: string, revision: number, p: number[]) {
  const res = await postForm(`/workspace/${id}`, { intent: "save", revision: String(revision), title: `Relay tally ${unique()}`, notes: "", params: iid(p) }, user.cookie);
  expect(res.status).toBe(200);
}

function newModelForm(slug: string, extra: Record<string, string> = {}) {
  return { kind: "new-model", changeNote: "First fit of the relay tallies", slug, title: `Relay tallies ${slug}`, summary: "Symbol counts of a shore relay's status byte.", tags: "relay, tally", provenance: "", ...extra };
}

async function submitNewModel(user: TestUser, itemId: string, slug: string): Promise<string> {
  return locationId(await postForm(`/workspace/${itemId}/submit`, newModelForm(slug), user.cookie), "/workspace/proposals/");
}

const decide = (user: TestUser, id: string, decision: string, note = "Checked against the field log.") => postForm(`/review/${id}`, { intent: "decide", decision, note }, user.cookie);
const authorAction = (user: TestUser, id: string, fields: Record<string, string>) => postForm(`/workspace/proposals/${id}`, fields, user.cookie);

async function proposalRow(id: string) {
  const [row] = await db().select().from(proposals).where(eq(proposals.id, id));
  return row;
}

async function countsFor(id: string) {
  const comments = await db().select().from(reviewComments).where(eq(reviewComments.proposalId, id));
  const audit = await db().select().from(auditLog).where(eq(auditLog.target, id));
  return { comments: comments.length, audit: audit.length };
}

async function editionNumbers(slug: string): Promise<number[]> {
  const rows = await db().select({ n: editions.number }).from(editions).innerJoin(models, eq(models.id, editions.modelId)).where(eq(models.slug, slug)).orderBy(editions.number);
  return rows.map((r) => r.n);
}

/** Messages the test server's fake SMTP stored for `email` that mention `needle`. */
function mailFor(email: string, needle: string): { subject: string; text: string; html: string }[] {
  if (!mailDir) throw new Error("ERGOSHELF_MAIL_DIR is not set: run the integration tests through npm test");
  return readdirSync(mailDir)
    .filter((f) => f.endsWith(".json"))
    .map((f) => JSON.parse(readFileSync(join(mailDir, f), "utf8")) as { to: string[]; subject: string; text: string; html: string })
    .filter((m) => m.to.some((t) => t.toLowerCase().includes(email.toLowerCase())) && (m.text.includes(needle) || m.subject.includes(needle)));
}

/** Mail is sent after the commit, from the same request; give the fake a moment to store it. */
async function waitForMail(email: string, needle: string, count = 1) {
  for (let i = 0; i < 50; i++) {
    const found = mailFor(email, needle);
    if (found.length >= count) return found;
    await new Promise((r) => setTimeout(r, 100));
  }
  return mailFor(email, needle);
}

describe("a new model, from submission to publication", () => {
  const slug = `relay-tally-${unique()}`;
  let itemId: string;
  let id: string;

  it("submits: 302 to the author's page, state submitted, the snapshot frozen, audit and mail to curators", async () => {
    ({ id: itemId } = await item(author, [0.5, 0.25, 0.25]));
    id = await submitNewModel(author, itemId, slug);
    const row = await proposalRow(id);
    expect(row).toMatchObject({ state: "submitted", kind: "new-model", proposedSlug: slug, authorId: author.id, itemId });
    expect((row.snapshot as { params: { p: number[] } }).params.p).toEqual([0.5, 0.25, 0.25]);
    const [audit] = await db().select().from(auditLog).where(and(eq(auditLog.target, id), eq(auditLog.action, "proposal.submit")));
    expect(audit.actorId).toBe(author.id);
    const mail = await waitForMail(curator.email, `/review/${id}`);
    expect(mail).toHaveLength(1);
    expect(mail[0].subject).toContain("Proposal submitted");
    expect(mail[0].html).toContain(`/review/${id}`);
    // The author is not told of their own submission.
    expect(mailFor(author.email, id)).toHaveLength(0);
  });

  it("keeps the snapshot when the item is saved again, and refuses a second open proposal on the item (409)", async () => {
    await save(author, itemId, 2, [0.4, 0.3, 0.3]);
    expect(((await proposalRow(id)).snapshot as { params: { p: number[] } }).params.p).toEqual([0.5, 0.25, 0.25]);
    const res = await postForm(`/workspace/${itemId}/submit`, newModelForm(`relay-tally-${unique()}`), author.cookie);
    expect(res.status).toBe(409);
    expect(await res.text()).toContain("already has an open proposal");
    expect(await db().select().from(proposals).where(eq(proposals.itemId, itemId))).toHaveLength(1);
  });

  it("lets the author and curators read it, and nobody else (404 for another contributor, 403 on the review page)", async () => {
    expect((await get(`/workspace/proposals/${id}`, author.cookie)).status).toBe(200);
    expect((await get(`/workspace/proposals/${id}`, other.cookie)).status).toBe(404);
    expect((await get(`/workspace/proposals/${id}`, curator.cookie)).status).toBe(404);
    expect((await get(`/review/${id}`, curator.cookie)).status).toBe(200);
    expect((await get(`/review/${id}`, admin.cookie)).status).toBe(200);
    expect((await get(`/review/${id}`, author.cookie)).status).toBe(403);
    expect((await get("/review", other.cookie)).status).toBe(403);
    const signedOut = await get(`/review/${id}`);
    expect(signedOut.status).toBe(302);
    expect(signedOut.headers.get("location")).toMatch(/^\/sign-in/);
    const queue = await (await get("/review?state=submitted", curator.cookie)).text();
    expect(queue).toContain(`/review/${id}`);
  });

  it("filters the queue by state, family and age from the URL, and says when a filter is not understood", async () => {
    const has = async (query: string) => (await (await get(`/review?${query}`, curator.cookie)).text()).includes(`/review/${id}`);
    expect(await has("family=iid")).toBe(true);
    expect(await has("family=hidden")).toBe(false);
    expect(await has("state=accepted")).toBe(false);
    expect(await has("olderThan=1")).toBe(false);
    const res = await get("/review?sort=score", curator.cookie);
    expect(res.status).toBe(200);
    expect(await res.text()).toContain("Some filters in the address were not understood (sort must be one of");
  });

  it("refuses a contributor's decision (403) and another contributor's actions (404), changing nothing", async () => {
    const before = await countsFor(id);
    expect((await decide(author, id, "accept")).status).toBe(403);
    expect((await decide(other, id, "decline")).status).toBe(403);
    expect((await authorAction(other, id, { intent: "withdraw", note: "" })).status).toBe(404);
    expect((await authorAction(other, id, { intent: "comment", body: "Looks off" })).status).toBe(404);
    expect((await proposalRow(id)).state).toBe("submitted");
    expect(await countsFor(id)).toEqual(before);
  });

  it("refuses bad decision input with 400 and the reason, recording nothing", async () => {
    const before = await countsFor(id);
    const cases: [Record<string, string>, string][] = [
      [{ intent: "decide", decision: "accept", note: "  " }, "a note for the author is needed"],
      [{ intent: "decide", decision: "approve", note: "fine" }, "choose a decision"],
      [{ intent: "decide", decision: "accept", note: "x".repeat(4001) }, "at most 4000 characters"],
      [{ intent: "comment", body: "" }, "a comment is needed"],
      [{ intent: "publish" }, "intent must be"],
    ];
    for (const [fields, message] of cases) {
      const res = await postForm(`/review/${id}`, fields, curator.cookie);
      expect(res.status, JSON.stringify(fields).slice(0, 80)).toBe(400);
      expect(await res.text()).toContain(message);
    }
    expect((await proposalRow(id)).state).toBe("submitted");
    expect(await countsFor(id)).toEqual(before);
  });

  it("asks for changes: state, thread, audit, and mail to the author with a link to their page", async () => {
    const res = await decide(curator, id, "request-changes", "Give the tally period in the summary.");
    expect(res.status).toBe(302);
    expect((await proposalRow(id)).state).toBe("changes-requested");
    const [audit] = await db().select().from(auditLog).where(and(eq(auditLog.target, id), eq(auditLog.action, "proposal.request-changes")));
    expect(audit.actorId).toBe(curator.id);
    const mail = await waitForMail(author.email, `/workspace/proposals/${id}`);
    expect(mail).toHaveLength(1);
    expect(mail[0].text).toContain("Give the tally period in the summary.");
  });

  it("refuses decisions that the state does not allow (409): accept or ask again before the resubmission", async () => {
    const before = await countsFor(id);
    for (const decision of ["accept", "request-changes"]) {
      const res = await decide(curator, id, decision);
      expect(res.status).toBe(409);
      expect(await res.text()).toContain("the author has not resubmitted it yet");
    }
    expect(await countsFor(id)).toEqual(before);
  });

  it("refuses a resubmission without a note (400) and resubmits the item's latest revision with one", async () => {
    const bad = await authorAction(author, id, { intent: "resubmit", note: " " });
    expect(bad.status).toBe(400);
    expect(await bad.text()).toContain("a note on what changed is needed");
    expect((await proposalRow(id)).state).toBe("changes-requested");

    expect((await authorAction(author, id, { intent: "resubmit", note: "Summary now names the period." })).status).toBe(302);
    const row = await proposalRow(id);
    expect(row.state).toBe("resubmitted");
    expect((row.snapshot as { params: { p: number[] }; revision: number }).params.p).toEqual([0.4, 0.3, 0.3]);
    expect((row.snapshot as { revision: number }).revision).toBe(3);
    // Resubmitting twice is a state error.
    expect((await authorAction(author, id, { intent: "resubmit", note: "again" })).status).toBe(409);
    expect(await waitForMail(curator.email, `/review/${id}`, 2)).toHaveLength(2);
  });

  it("accepts: publishes edition 1 with the snapshot's figures, records proposal.accept and edition.publish, mails the author", async () => {
    const res = await decide(curator, id, "accept", "Published as the relay's reference tally.");
    expect(res.status).toBe(302);
    const row = await proposalRow(id);
    expect(row.state).toBe("accepted");
    expect(row.decidedBy).toBe(curator.id);
    expect(await editionNumbers(slug)).toEqual([1]);
    const api = (await (await get(`/api/v1/models/${slug}/editions/1`)).json()) as { params: { p: number[] }; figures: { entropyRate: { bits: number } } };
    expect(api.params.p).toEqual([0.4, 0.3, 0.3]);
    // Entropy of (0.4, 0.3, 0.3) in bits, from the definition: −Σ p log₂ p (Shannon 1948).
    expect(api.figures.entropyRate.bits).toBeCloseTo(-(0.4 * Math.log2(0.4) + 2 * 0.3 * Math.log2(0.3)), 12);
    const actions = (await db().select().from(auditLog).where(inArray(auditLog.target, [id, `ergoshelf:${slug}@1`]))).map((a) => a.action);
    expect(actions).toEqual(expect.arrayContaining(["proposal.accept", "edition.publish"]));
    const mail = await waitForMail(author.email, `ergoshelf:${slug}@1`);
    expect(mail).toHaveLength(1);
    expect(mail[0].html).toContain(`/library/${slug}/e/1`);
  });

  it("refuses a second acceptance, a withdrawal and a comment once decided (409), leaving one edition", async () => {
    expect((await decide(curator2, id, "accept")).status).toBe(409);
    expect((await authorAction(author, id, { intent: "withdraw", note: "" })).status).toBe(409);
    expect((await authorAction(author, id, { intent: "comment", body: "Thanks" })).status).toBe(409);
    expect(await editionNumbers(slug)).toEqual([1]);
  });

  it("refuses a new model whose slug is taken (400, next to the field) and bad submit input, saving nothing", async () => {
    const { id: fresh } = await item(other, [0.9, 0.1]);
    const cases: [Record<string, string>, string][] = [
      [newModelForm(slug), "already used by a library model"],
      [newModelForm("Not A Slug"), "lower-case letters, digits and single hyphens"],
      [newModelForm(`relay-${unique()}`, { summary: "" }), "a summary is needed"],
      [newModelForm(`relay-${unique()}`, { changeNote: "" }), "a change note is needed"],
      [{ kind: "replace", changeNote: "x" }, "choose whether this is a new edition or a new model"],
      // The item was not cloned from the library, so it cannot be a new edition.
      [{ kind: "new-edition", changeNote: "x" }, "can only be proposed as a new model"],
    ];
    for (const [fields, message] of cases) {
      const res = await postForm(`/workspace/${fresh}/submit`, fields, other.cookie);
      expect(res.status, JSON.stringify(fields).slice(0, 80)).toBe(400);
      expect(await res.text()).toContain(message);
    }
    expect(await db().select().from(proposals).where(eq(proposals.itemId, fresh))).toHaveLength(0);
  });

  it("refuses to submit another user's item (404)", async () => {
    expect((await postForm(`/workspace/${itemId}/submit`, newModelForm(`relay-${unique()}`), other.cookie)).status).toBe(404);
  });
});

describe("new editions, the author-reviewer rule and the race", () => {
  const slug = `relay-edition-${unique()}`;

  /** A contributor's clone of the model's edition 1, changed to `p` and saved. */
  async function clone(user: TestUser, p: number[]): Promise<string> {
    const id = locationId(await postForm("/workspace/new", { intent: "clone", slug, edition: "1" }, user.cookie), "/workspace/");
    await save(user, id, 1, p);
    return id;
  }

  beforeAll(async () => {
    const { id } = await item(author, [0.7, 0.2, 0.1]);
    const pid = await submitNewModel(author, id, slug);
    expect((await decide(curator, pid, "accept")).status).toBe(302);
  });

  it("refuses a new edition with unchanged parameters (400) and saves nothing", async () => {
    const id = locationId(await postForm("/workspace/new", { intent: "clone", slug, edition: "1" }, other.cookie), "/workspace/");
    const res = await postForm(`/workspace/${id}/submit`, { kind: "new-edition", changeNote: "no change" }, other.cookie);
    expect(res.status).toBe(400);
    expect(await res.text()).toContain("the same as edition 1");
    expect(await db().select().from(proposals).where(eq(proposals.itemId, id))).toHaveLength(0);
  });

  it("does not let a curator decide on their own proposal (403), while another curator may", async () => {
    const itemId = await clone(curatorAuthor, [0.6, 0.3, 0.1]);
    const id = locationId(await postForm(`/workspace/${itemId}/submit`, { kind: "new-edition", changeNote: "Refit on the spring log" }, curatorAuthor.cookie), "/workspace/proposals/");
    const before = await countsFor(id);
    const own = await decide(curatorAuthor, id, "accept");
    expect(own.status).toBe(403);
    expect(await own.text()).toContain("another curator must review it");
    expect(await countsFor(id)).toEqual(before);
    // The review page tells them so instead of offering the decision.
    expect(await (await get(`/review/${id}`, curatorAuthor.cookie)).text()).toContain('data-testid="own-proposal"');
    expect((await decide(curator2, id, "decline", "The spring log has a gap; refit with the full season.")).status).toBe(302);
    expect((await proposalRow(id)).state).toBe("declined");
    expect(await waitForMail(curatorAuthor.email, `/workspace/proposals/${id}`)).toHaveLength(1);
  });

  it("gives two proposals accepted at once by two curators consecutive edition numbers", async () => {
    const a = await clone(author, [0.5, 0.3, 0.2]);
    const b = await clone(other, [0.4, 0.4, 0.2]);
    const pa = locationId(await postForm(`/workspace/${a}/submit`, { kind: "new-edition", changeNote: "Refit A" }, author.cookie), "/workspace/proposals/");
    const pb = locationId(await postForm(`/workspace/${b}/submit`, { kind: "new-edition", changeNote: "Refit B" }, other.cookie), "/workspace/proposals/");
    const [ra, rb] = await Promise.all([decide(curator, pa, "accept"), decide(curator2, pb, "accept")]);
    expect([ra.status, rb.status]).toEqual([302, 302]);
    expect(await editionNumbers(slug)).toEqual([1, 2, 3]);
    const published = await db().select({ p: editions.params, n: editions.number }).from(editions).innerJoin(models, eq(models.id, editions.modelId)).where(eq(models.slug, slug));
    const byNumber = new Map(published.map((e) => [e.n, (e.p as { p: number[] }).p]));
    expect([byNumber.get(2), byNumber.get(3)]).toEqual(expect.arrayContaining([[0.5, 0.3, 0.2], [0.4, 0.4, 0.2]]));
  });

  it("publishes once when two curators accept the same proposal at once: one 302, one 409", async () => {
    const c = await clone(other, [0.34, 0.33, 0.33]);
    const pc = locationId(await postForm(`/workspace/${c}/submit`, { kind: "new-edition", changeNote: "Refit C" }, other.cookie), "/workspace/proposals/");
    const results = await Promise.all([decide(curator, pc, "accept"), decide(curator2, pc, "accept")]);
    expect(results.map((r) => r.status).sort()).toEqual([302, 409]);
    expect(await editionNumbers(slug)).toEqual([1, 2, 3, 4]);
    const accepts = await db().select().from(auditLog).where(and(eq(auditLog.target, pc), eq(auditLog.action, "proposal.accept")));
    expect(accepts).toHaveLength(1);
  });

  it("lets one of two simultaneous submissions of the same item through (one 302, one 409)", async () => {
    const d = await clone(author, [0.3, 0.3, 0.4]);
    const results = await Promise.all([1, 2].map((n) => postForm(`/workspace/${d}/submit`, { kind: "new-edition", changeNote: `Refit D${n}` }, author.cookie)));
    expect(results.map((r) => r.status).sort()).toEqual([302, 409]);
    expect(await db().select().from(proposals).where(eq(proposals.itemId, d))).toHaveLength(1);
  });

  it("lets the author withdraw an open proposal, after which curators cannot decide (409)", async () => {
    const e = await clone(other, [0.2, 0.2, 0.6]);
    const pe = locationId(await postForm(`/workspace/${e}/submit`, { kind: "new-edition", changeNote: "Refit E" }, other.cookie), "/workspace/proposals/");
    expect((await authorAction(other, pe, { intent: "withdraw", note: "Wrong season." })).status).toBe(302);
    expect((await proposalRow(pe)).state).toBe("withdrawn");
    const res = await decide(curator, pe, "accept");
    expect(res.status).toBe(409);
    expect(await res.text()).toContain("already withdrawn");
    // A withdrawn proposal no longer blocks a new one on the same item.
    expect((await postForm(`/workspace/${e}/submit`, { kind: "new-edition", changeNote: "Refit E, full season" }, other.cookie)).status).toBe(302);
  });

  it("sends the author a curator's comment, and refuses an unknown intent from the author (400)", async () => {
    const f = await clone(author, [0.25, 0.25, 0.5]);
    const pf = locationId(await postForm(`/workspace/${f}/submit`, { kind: "new-edition", changeNote: "Refit F" }, author.cookie), "/workspace/proposals/");
    expect((await postForm(`/review/${pf}`, { intent: "comment", body: "Which relay firmware logged this?" }, curator.cookie)).status).toBe(302);
    const mail = await waitForMail(author.email, "Which relay firmware logged this?");
    expect(mail).toHaveLength(1);
    expect(mail[0].html).toContain(`/workspace/proposals/${pf}`);
    const before = await countsFor(pf);
    expect((await authorAction(author, pf, { intent: "accept" })).status).toBe(400);
    expect(await countsFor(pf)).toEqual(before);
  });
});
