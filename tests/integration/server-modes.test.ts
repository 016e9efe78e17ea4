// Servers started with other settings: a database that does not answer, and production without demo mode.
import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";
import { afterEach, describe, expect, it } from "vitest";

const children: ChildProcess[] = [];
afterEach(() => {
  for (const c of children.splice(0)) c.kill("SIGTERM");
});

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

async function startServer(env: Record<string, string>): Promise<string> {
  const port = await freePort();
  const child = spawn("node_modules/.bin/react-router-serve", ["build/server/index.js"], {
    env: { ...process.env, HOST: "127.0.0.1", PORT: String(port), ...env },
    stdio: "ignore",
  });
  children.push(child);
  const base = `http://127.0.0.1:${port}`;
  for (let i = 0; i < 100; i++) {
    try {
      await fetch(`${base}/favicon.svg`);
      return base;
    } catch {
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  throw new Error("the server did not start");
}

describe("GET /healthz", () => {
  it("answers 200 { ok: true, db: true } with the database up", async () => {
    const res = await fetch(`${process.env.ERGOSHELF_TEST_BASE_URL}/healthz`);
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ ok: true, db: true });
  });

  it("answers 503 with a JSON error when the database does not answer", async () => {
    const deadPort = await freePort();
    const base = await startServer({ DATABASE_URL: `postgres://ergoshelf:x@127.0.0.1:${deadPort}/ergoshelf` });
    const res = await fetch(`${base}/healthz`);
    expect(res.status).toBe(503);
    const body = await res.json();
    expect(body.ok).toBe(false);
    expect(body.db).toBe(false);
    expect(body.error.message).toMatch(/database/i);
  });
});

describe("demo accounts in production", () => {
  it("are refused unless ERGOSHELF_DEMO=1", async () => {
    const base = await startServer({ NODE_ENV: "production", ERGOSHELF_DEMO: "0" });
    const res = await fetch(`${base}/sign-in`, {
      method: "POST",
      redirect: "manual",
      headers: { "Content-Type": "application/x-www-form-urlencoded" },
      body: new URLSearchParams({ email: "admin@example.org", password: "ergoshelf-demo" }),
    });
    expect(res.status).toBe(400);
    expect(await res.text()).toContain("Demo accounts are turned off on this server");
  });
});
