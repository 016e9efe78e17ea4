import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

const root = "/work/main";
let dir: string;

function run(args: string[], stdin?: string): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    const child = execFile("node_modules/.bin/tsx", ["scripts/compute.ts", ...args], { cwd: root }, (err, stdout, stderr) => {
      resolve({ code: err ? ((err as { code?: number }).code ?? 1) : 0, stdout, stderr });
    });
    if (stdin !== undefined) child.stdin!.end(stdin);
    else child.stdin!.end();
  });
}

const buoy = { family: "two-state", alphabet: ["calm", "swell"], a: 0.1, b: 0.3 };

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "ergoshelf-cli-"));
  writeFileSync(join(dir, "buoy.json"), JSON.stringify(buoy));
  writeFileSync(join(dir, "request.json"), JSON.stringify({ model: buoy, renyiOrders: [3] }));
  writeFileSync(join(dir, "bad-row.json"), JSON.stringify({ family: "markov", alphabet: ["a", "b", "c"], P: [[1, 0, 0], [0.5, 0.5, 0], [0.2, 0.2, 0.2]] }));
  writeFileSync(join(dir, "broken.json"), '{ "family": "iid", ');
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("scripts/compute.ts", () => {
  it("computes a bare model file", async () => {
    const r = await run([join(dir, "buoy.json")]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.entropyRate.bits).toBeGreaterThan(0);
    expect(out.verification.passed).toBe(true);
    expect(r.stdout.startsWith('{\n  "engineVersion"')).toBe(true);
  });

  it("accepts a full request", async () => {
    const r = await run([join(dir, "request.json")]);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).renyi.map((x: { order: number }) => x.order)).toEqual([0.5, 2, 3, 4]);
  });

  it("reads standard input with -", async () => {
    const r = await run(["-"], JSON.stringify(buoy));
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).stationary).toEqual([expect.closeTo(0.75, 14), expect.closeTo(0.25, 14)]);
  });

  it("exits 2 and names the row on invalid input", async () => {
    const r = await run([join(dir, "bad-row.json")]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain('model.P[2]: row 2 ("c") sums to 0.6, not 1 (off by 0.4)');
  });

  it("exits 2 on bad JSON and on a missing file", async () => {
    const bad = await run([join(dir, "broken.json")]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/is not valid JSON/);
    const missing = await run([join(dir, "nope.json")]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/cannot read/);
  });

  it("prints usage with --help", async () => {
    const r = await run(["--help"]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^Usage: npm run compute/);
  });
});
