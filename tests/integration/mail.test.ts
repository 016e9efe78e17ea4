// E-mail end to end: the templates go through mail.server.ts's SMTP transport to the fake
// (scripts/mail-fake.ts, started here on a free port with its own folder), and are read back.
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { createUser } from "./fixtures";

const mailDir = mkdtempSync(join(tmpdir(), "ergoshelf-mail-test-"));
const children: ChildProcess[] = [];
let smtpPort = 0;

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.listen(0, "127.0.0.1", () => {
      const port = (srv.address() as { port: number }).port;
      srv.close(() => resolve(port));
    });
    srv.on("error", reject);
  });
}

/** Starts the fake and resolves with its output once it listens (or rejects with what it said). */
function startFake(port: number, dir: string): Promise<{ child: ChildProcess; output: () => string }> {
  const child = spawn("node_modules/.bin/tsx", ["scripts/mail-fake.ts"], {
    env: { ...process.env, SMTP_PORT: String(port), ERGOSHELF_MAIL_DIR: dir },
    stdio: ["ignore", "pipe", "pipe"],
  });
  children.push(child);
  let out = "";
  const output = () => out;
  return new Promise((resolve, reject) => {
    const onData = (chunk: Buffer) => {
      out += chunk.toString();
      if (out.includes("listening on")) resolve({ child, output });
    };
    child.stdout!.on("data", onData);
    child.stderr!.on("data", onData);
    child.on("exit", (code) => reject(new Error(`the fake exited with ${code}: ${out}`)));
  });
}

function exitCode(child: ChildProcess): Promise<number | null> {
  return new Promise((resolve) => {
    if (child.exitCode !== null) resolve(child.exitCode);
    else child.on("exit", (code) => resolve(code));
  });
}

// mail.server.ts reads SMTP_PORT through env(), which caches; the transport is therefore built
// with an explicit port, and the mailbox folder is read from process.env on each call.
const mail = await import("~/.server/mail.server");
let transport: ReturnType<typeof mail.createTransport>;

beforeAll(async () => {
  smtpPort = await freePort();
  await startFake(smtpPort, mailDir);
  process.env.ERGOSHELF_MAIL_DIR = mailDir;
  transport = mail.createTransport({ host: "127.0.0.1", port: smtpPort });
});

afterAll(async () => {
  transport?.close();
  for (const c of children.splice(0)) {
    if (c.exitCode === null) {
      c.kill("SIGTERM");
      await exitCode(c);
    }
  }
  rmSync(mailDir, { recursive: true, force: true });
});

const hostileTitle = `Kelpmoor buoy <script>alert("x")</script> & drift`;
const base = () => mail.mailBaseUrl();

async function sendAndRead(content: { subject: string; text: string; html: string }, to: string | string[]) {
  const before = new Set((await mail.readFakeMailbox({ limit: 5000 })).map((m) => m.id));
  const result = await mail.sendMail({ to, ...content }, { transport: transport! });
  expect(result.status).toBe("sent");
  const after = await mail.readFakeMailbox({ limit: 5000 });
  const fresh = after.filter((m) => !before.has(m.id));
  expect(fresh).toHaveLength(1);
  return fresh[0];
}

function expectEscaped(html: string) {
  expect(html).not.toContain("<script>");
  expect(html).toContain("&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; drift");
}

describe("review mail through SMTP to the fake", () => {
  it("proposalSubmittedMail reaches every curator with both parts, escaped, and a review link", async () => {
    const content = mail.proposalSubmittedMail({
      proposalId: "6f1c0b7e-1111-4222-8333-944445555666",
      title: hostileTitle,
      authorName: "Ines Harrow",
      kind: "new-edition",
      modelSlug: "kelpmoor-tide-gauge",
    });
    const stored = await sendAndRead(content, ["curator-a@kelpmoor.invalid", "curator-b@kelpmoor.invalid"]);
    expect(stored.to).toEqual(["curator-a@kelpmoor.invalid", "curator-b@kelpmoor.invalid"]);
    expect(stored.subject).toBe(`Proposal submitted: ${hostileTitle}`);
    expect(stored.from).toContain("Ergoshelf");
    const href = `${base()}/review/6f1c0b7e-1111-4222-8333-944445555666`;
    expect(stored.text).toContain(`Ines Harrow submitted “${hostileTitle}” for review`);
    expect(stored.text).toContain("a new edition of the model kelpmoor-tide-gauge");
    expect(stored.text).toContain(href);
    expectEscaped(stored.html);
    expect(stored.html).toContain(`href="${href}"`);
    expect(stored.html).toContain("#9b3d1f");
  });

  it("changesRequestedMail carries the curator's note as text, quoted in the plain part", async () => {
    const content = mail.changesRequestedMail({
      proposalId: "p-changes",
      title: hostileTitle,
      curatorName: "Oskar Fenn",
      note: "Row 3 of P sums to 0.98.\n<img src=x onerror=alert(1)>",
    });
    const stored = await sendAndRead(content, "author@kelpmoor.invalid");
    expect(stored.to).toEqual(["author@kelpmoor.invalid"]);
    expect(stored.subject).toBe(`Changes requested: ${hostileTitle}`);
    expect(stored.text).toContain("> Row 3 of P sums to 0.98.\n> <img src=x onerror=alert(1)>");
    expect(stored.text).toContain(`${base()}/workspace/proposals/p-changes`);
    expectEscaped(stored.html);
    expect(stored.html).not.toContain("<img");
    expect(stored.html).toContain("&lt;img src=x onerror=alert(1)&gt;");
  });

  it("proposalAcceptedMail names the citation key and links to the published edition", async () => {
    const content = mail.proposalAcceptedMail({
      proposalId: "p-accepted",
      title: hostileTitle,
      curatorName: "Oskar Fenn",
      citationKey: "ergoshelf:kelpmoor-tide-gauge@3",
    });
    const stored = await sendAndRead(content, "author@kelpmoor.invalid");
    expect(stored.subject).toBe(`Accepted and published: ${hostileTitle}`);
    expect(stored.text).toContain("Cite it as ergoshelf:kelpmoor-tide-gauge@3.");
    expect(stored.text).toContain(`${base()}/library/kelpmoor-tide-gauge/e/3`);
    expect(stored.html).toContain(`href="${base()}/library/kelpmoor-tide-gauge/e/3"`);
    expectEscaped(stored.html);
  });

  it("proposalDeclinedMail gives the reason and links to the proposal", async () => {
    const content = mail.proposalDeclinedMail({
      proposalId: "p-declined",
      title: hostileTitle,
      curatorName: "Oskar Fenn",
      reason: "Duplicates the harbour-pilot model.",
    });
    const stored = await sendAndRead(content, "author@kelpmoor.invalid");
    expect(stored.subject).toBe(`Declined: ${hostileTitle}`);
    expect(stored.text).toContain("> Duplicates the harbour-pilot model.");
    expect(stored.html).toContain("Duplicates the harbour-pilot model.");
    expect(stored.html).toContain(`href="${base()}/workspace/proposals/p-declined"`);
    expectEscaped(stored.html);
  });

  it("newCommentMail quotes the comment and links to the proposal", async () => {
    const content = mail.newCommentMail({
      proposalId: "p-comment",
      title: hostileTitle,
      commenterName: "Oskar Fenn",
      comment: "Could the swell states be merged?",
    });
    const stored = await sendAndRead(content, "author@kelpmoor.invalid");
    expect(stored.subject).toBe(`New comment on ${hostileTitle}`);
    expect(stored.text).toContain("> Could the swell states be merged?");
    expect(stored.text).toContain(`${base()}/workspace/proposals/p-comment`);
    expectEscaped(stored.html);
  });

  it("stores the raw message beside the JSON, with sortable names, and lists newest first", async () => {
    const names = readdirSync(mailDir).sort();
    const json = names.filter((n) => n.endsWith(".json"));
    expect(json.length).toBeGreaterThanOrEqual(5);
    for (const n of json) expect(names).toContain(n.replace(/\.json$/, ".eml"));
    const raw = readFileSync(join(mailDir, json[0].replace(/\.json$/, ".eml")), "utf8");
    expect(raw).toMatch(/^Subject: /m);
    const listed = await mail.readFakeMailbox({ limit: 5000 });
    expect(listed.map((m) => `${m.id}.json`)).toEqual([...json].reverse());
    expect(listed[0].subject).toContain("New comment on");
    expect(await mail.readFakeMailbox({ limit: 2 })).toHaveLength(2);
    expect(await mail.readFakeMail("../../etc/passwd")).toBeNull();
  });
});

describe("mail never throws", () => {
  it("reports a server that does not answer as failed, and logs it", async () => {
    const errors = vi.spyOn(console, "error").mockImplementation(() => {});
    const dead = mail.createTransport({ host: "127.0.0.1", port: await freePort() })!;
    const result = await mail.sendMail({ to: "author@kelpmoor.invalid", subject: "x", text: "x", html: "<p>x</p>" }, { transport: dead });
    expect(result.status).toBe("failed");
    expect(errors).toHaveBeenCalledTimes(1);
    expect(String(errors.mock.calls[0][0])).toContain("failed to send");
    errors.mockRestore();
  });

  it("skips a message without a valid recipient", async () => {
    const warn = vi.spyOn(console, "warn").mockImplementation(() => {});
    const info = vi.spyOn(console, "info").mockImplementation(() => {});
    const result = await mail.sendMail({ to: ["not an address"], subject: "x", text: "x", html: "x" }, { transport: transport! });
    expect(result).toEqual({ status: "skipped", reason: "no recipients" });
    expect(warn).toHaveBeenCalled();
    warn.mockRestore();
    info.mockRestore();
  });

  it("refuses a message over 1 MB with 552 and stores nothing", async () => {
    const errors = vi.spyOn(console, "error").mockImplementation(() => {});
    const before = readdirSync(mailDir).length;
    const result = await mail.sendMail(
      { to: "author@kelpmoor.invalid", subject: "oversized", text: "0".repeat(1_100_000), html: "" },
      { transport: transport! },
    );
    expect(result.status).toBe("failed");
    expect(result.status === "failed" && result.error).toContain("552");
    expect(readdirSync(mailDir).length).toBe(before);
    errors.mockRestore();
  });
});

describe("scripts/mail-fake.ts", () => {
  it("refuses to start, with exit code 1 and a clear message, when its port is taken", async () => {
    const second = spawn("node_modules/.bin/tsx", ["scripts/mail-fake.ts"], {
      env: { ...process.env, SMTP_PORT: String(smtpPort), ERGOSHELF_MAIL_DIR: mailDir },
      stdio: ["ignore", "pipe", "pipe"],
    });
    children.push(second);
    let said = "";
    second.stderr!.on("data", (c: Buffer) => (said += c.toString()));
    expect(await exitCode(second)).toBe(1);
    expect(said).toContain(`port ${smtpPort} on 127.0.0.1 is taken`);
  });

  it("stops cleanly (exit 0) on SIGTERM", async () => {
    const dir = mkdtempSync(join(tmpdir(), "ergoshelf-mail-stop-"));
    try {
      const { child } = await startFake(await freePort(), dir);
      child.kill("SIGTERM");
      expect(await exitCode(child)).toBe(0);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

// /dev/mail is tried on a production server of our own, with and without the fake.
async function startApp(extra: Record<string, string>): Promise<{ url: string; child: ChildProcess }> {
  const port = await freePort();
  const child = spawn("node_modules/.bin/react-router-serve", ["build/server/index.js"], {
    env: { ...process.env, NODE_ENV: "production", HOST: "127.0.0.1", PORT: String(port), ...extra },
    stdio: "ignore",
  });
  children.push(child);
  const url = `http://127.0.0.1:${port}`;
  for (let i = 0; i < 150; i++) {
    try {
      await fetch(`${url}/favicon.svg`);
      return { url, child };
    } catch {
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  throw new Error("the app server did not start");
}

describe("GET /dev/mail", () => {
  it("is 404 on a server that does not use the fake", async () => {
    const { url } = await startApp({ ERGOSHELF_MAIL_FAKE: "0", SMTP_PORT: String(smtpPort), ERGOSHELF_MAIL_DIR: mailDir });
    const user = await createUser("admin");
    const res = await fetch(`${url}/dev/mail`, { headers: { Cookie: user.cookie }, redirect: "manual" });
    expect(res.status).toBe(404);
    expect(await res.text()).not.toContain("Changes requested:");
  });

  it("with the fake: sends visitors to sign-in, and shows any signed-in user the list, the banner and a message", async () => {
    const { url } = await startApp({ ERGOSHELF_MAIL_FAKE: "1", SMTP_PORT: String(smtpPort), ERGOSHELF_MAIL_DIR: mailDir });
    const visitor = await fetch(`${url}/dev/mail`, { redirect: "manual" });
    expect(visitor.status).toBe(302);
    expect(visitor.headers.get("location")).toContain("/sign-in?redirectTo=%2Fdev%2Fmail");

    const curator = await createUser("curator");
    const list = await fetch(`${url}/dev/mail`, { headers: { Cookie: curator.cookie } });
    expect(list.status).toBe(200);
    const page = await list.text();
    expect(page).toContain("Development mailbox — every message this server sent; not present in production");
    expect(page).toContain("Changes requested: Kelpmoor buoy &lt;script&gt;");
    expect(page).not.toContain('<script>alert("x")');

    const [declined] = (await mail.readFakeMailbox({ limit: 5000 })).filter((m) => m.subject.startsWith("Declined:"));
    const one = await fetch(`${url}/dev/mail?id=${declined.id}`, { headers: { Cookie: curator.cookie } });
    expect(one.status).toBe(200);
    const shown = await one.text();
    expect(shown).toMatch(/<iframe[^>]*sandbox="allow-popups allow-popups-to-escape-sandbox"/);
    expect(shown).toContain(`href="${base()}/workspace/proposals/p-declined"`);

    const unknown = await fetch(`${url}/dev/mail?id=0000000000000-0000-000000`, { headers: { Cookie: curator.cookie } });
    expect(unknown.status).toBe(404);
    expect(await unknown.text()).toContain("No such message");
    const malformed = await fetch(`${url}/dev/mail?id=..%2F..%2Fetc`, { headers: { Cookie: curator.cookie } });
    expect(malformed.status).toBe(400);
  });
});
