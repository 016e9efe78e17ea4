// POST /api/v1/compute against the built server: the contract of DESIGN.md, bad input, limits.
import { describe, expect, it } from "vitest";
import { baseUrl, postJson } from "./fixtures";

// Binary entropy from its definition (Shannon 1948), computed here independently of the engine.
const h = (p: number) => (p <= 0 || p >= 1 ? 0 : -p * Math.log2(p) - (1 - p) * Math.log2(1 - p));

async function compute(body: unknown) {
  const res = await postJson("/api/v1/compute", body);
  return { status: res.status, json: await res.json() };
}

describe("compute API: answers", () => {
  it("two-state chain: the contract's fields, the closed form and a stationary distribution in state order", async () => {
    const a = 0.03;
    const b = 0.4;
    const { status, json } = await compute({ model: { family: "two-state", alphabet: ["calm", "gust"], a, b }, renyiOrders: [2, 0.5] });
    expect(status).toBe(200);
    // Two-state chain: μ = (b, a)/(a+b), rate (b·h(a) + a·h(b))/(a+b) (derivable from Shannon's formula).
    const rate = (b * h(a) + a * h(b)) / (a + b);
    expect(json.entropyRate.bits).toBeCloseTo(rate, 12);
    expect(json.entropyRate.nats).toBeCloseTo(rate * Math.LN2, 12);
    expect(json.stationary[0]).toBeCloseTo(b / (a + b), 12);
    expect(json.stationary[1]).toBeCloseTo(a / (a + b), 12);
    expect(json.irreducible).toBe(true);
    expect(json.period).toBe(1);
    expect(json.minEntropyRate.bits).toBeGreaterThan(0);
    expect(json.minEntropyRate.bits).toBeLessThanOrEqual(json.entropyRate.bits);
    expect(json.renyi.map((r: { order: number }) => r.order)).toEqual(expect.arrayContaining([2, 0.5]));
    for (const r of json.renyi) expect(Number.isFinite(r.bits)).toBe(true);
    expect(json.verification.passed).toBe(true);
  });

  it("i.i.d. source: H(p) and min-entropy −log₂ max p", async () => {
    const { status, json } = await compute({ model: { family: "iid", alphabet: ["0", "1"], p: [0.25, 0.75] } });
    expect(status).toBe(200);
    expect(json.entropyRate.bits).toBeCloseTo(0.8112781244591328, 13); // h(1/4), REFERENCES.md (derivable)
    expect(json.minEntropyRate.bits).toBeCloseTo(-Math.log2(0.75), 13);
  });

  it("random walk on a 4-regular graph: log₂ 4 = 2 bits", async () => {
    // A cycle C₈ with chords to the opposite node and the next-but-one: every node has degree 4.
    const nodes = Array.from({ length: 8 }, (_, i) => `n${i}`);
    const edges: [string, string, number][] = [];
    for (let i = 0; i < 8; i++) {
      edges.push([`n${i}`, `n${(i + 1) % 8}`, 1]);
      edges.push([`n${i}`, `n${(i + 2) % 8}`, 1]);
    }
    const { status, json } = await compute({ model: { family: "graph-walk", nodes, edges } });
    expect(status).toBe(200);
    expect(json.entropyRate.bits).toBeCloseTo(2, 12); // d-regular walk: log₂ d (Levin–Peres–Wilmer ch. 1)
    for (const m of json.stationary) expect(m).toBeCloseTo(1 / 8, 12);
  });

  it("order-2 Markov chain over three symbols", async () => {
    const row = [0.5, 0.3, 0.2];
    const P = Array.from({ length: 9 }, () => row);
    const { status, json } = await compute({ model: { family: "markov", alphabet: ["a", "b", "c"], order: 2, P } });
    expect(status).toBe(200);
    // Every context has the same next-symbol law: the source is i.i.d. with that law.
    const H = -row.reduce((s, p) => s + p * Math.log2(p), 0);
    expect(json.entropyRate.bits).toBeCloseTo(H, 12);
  });

  it("hidden Markov source: bounds that sandwich, in the contract's shape", async () => {
    const { status, json } = await compute({
      model: { family: "hidden", states: ["quiet", "noisy"], alphabet: ["ok", "err"], P: [[0.95, 0.05], [0.2, 0.8]], B: [[0.99, 0.01], [0.7, 0.3]] },
    });
    expect(status).toBe(200);
    expect(json.bounds.length).toBeGreaterThan(3);
    for (const b of json.bounds) {
      expect(b).toEqual({ n: expect.any(Number), lower: expect.any(Number), upper: expect.any(Number) });
      expect(b.lower).toBeLessThanOrEqual(b.upper);
    }
    const last = json.bounds[json.bounds.length - 1];
    expect(json.entropyRate.bits).toBeGreaterThanOrEqual(last.lower - 1e-12);
    expect(json.entropyRate.bits).toBeLessThanOrEqual(last.upper + 1e-12);
  });

  it("a reducible chain with two closed classes says the rate depends on the start", async () => {
    const { status, json } = await compute({ model: { family: "markov", alphabet: ["x", "y", "z"], order: 1, P: [[1, 0, 0], [0.5, 0, 0.5], [0, 0, 1]] } });
    expect(status).toBe(200);
    expect(json.irreducible).toBe(false);
    expect(json.closedClasses.length).toBe(2);
    expect(json.entropyRate).toBeNull();
    expect(json.message).toMatch(/initial distribution/);
  });
});

describe("compute API: bad input answers 422 with the issue named", () => {
  const cases: [string, unknown, RegExp, RegExp][] = [
    ["a row that does not sum to 1", { family: "markov", alphabet: ["a", "b"], order: 1, P: [[0.5, 0.5], [0.3, 0.6]] }, /model\.P\[1\]/, /row 1 .*sums to 0\.9/],
    ["a negative entry", { family: "markov", alphabet: ["a", "b"], order: 1, P: [[1.1, -0.1], [0.5, 0.5]] }, /model\.P\[0\]\[1\]/, /negative/],
    ["a non-number entry", { family: "markov", alphabet: ["a", "b"], order: 1, P: [[0.5, "half"], [0.5, 0.5]] }, /model\.P\[0\]\[1\]/, /./],
    ["a duplicate symbol", { family: "iid", alphabet: ["a", "b", "a"], p: [0.2, 0.3, 0.5] }, /model\.alphabet/, /duplicate/],
    ["wrong number of order-2 rows", { family: "markov", alphabet: ["a", "b"], order: 2, P: [[0.5, 0.5], [0.5, 0.5], [0.5, 0.5]] }, /model\.P/, /needs 4 rows/],
    ["an emission matrix that does not match", { family: "hidden", states: ["s", "t"], alphabet: ["0", "1"], P: [[0.5, 0.5], [0.5, 0.5]], B: [[1, 0]] }, /model\.B/, /B has 1 rows but there are 2 states/],
    ["a negative edge weight", { family: "graph-walk", nodes: ["u", "v"], edges: [["u", "v", -1]] }, /model\.edges\[0\]/, /negative weight/],
    ["an edge to an unknown node", { family: "graph-walk", nodes: ["u", "v"], edges: [["u", "w", 1]] }, /model\.edges\[0\]/, /unknown node "w"/],
    ["an isolated node", { family: "graph-walk", nodes: ["u", "v", "q"], edges: [["u", "v", 1]] }, /model\.nodes\[2\]/, /node "q" has no edges/],
    ["an unknown family", { family: "cellular", alphabet: ["a"] }, /model/, /unknown family/],
  ];
  for (const [what, model, path, message] of cases) {
    it(what, async () => {
      const { status, json } = await compute({ model });
      expect(status).toBe(422);
      expect(typeof json.error.message).toBe("string");
      expect(json.error.issues.some((i: { path: string; message: string }) => path.test(i.path) && message.test(i.message))).toBe(true);
    });
  }

  it("a Rényi order of 1 is refused", async () => {
    const { status, json } = await compute({ model: { family: "iid", alphabet: ["a", "b"], p: [0.5, 0.5] }, renyiOrders: [1] });
    expect(status).toBe(422);
    expect(json.error.issues[0].path).toMatch(/renyiOrders\[0\]/);
  });

  it("a matrix over the dense size limit is refused with the limit named", async () => {
    const alphabet = Array.from({ length: 17 }, (_, i) => `s${i}`);
    const { status, json } = await compute({ model: { family: "markov", alphabet, order: 3, P: [] } });
    expect(status).toBe(422);
    expect(json.error.issues.map((i: { message: string }) => i.message).join(" ")).toMatch(/4,096/);
  });

  it("JSON that does not parse", async () => {
    const res = await postJson("/api/v1/compute", "{ not json");
    expect(res.status).toBe(422);
    expect((await res.json()).error.message).toMatch(/not valid JSON/);
  });

  it("an empty body", async () => {
    const res = await fetch(`${baseUrl}/api/v1/compute`, { method: "POST", headers: { "Content-Type": "application/json" } });
    expect(res.status).toBe(422);
  });

  it("a body over the size limit answers 413", async () => {
    const big = JSON.stringify({ model: { family: "iid", alphabet: ["a"], p: [1] }, pad: "x".repeat(65 * 1024 * 1024) });
    const res = await postJson("/api/v1/compute", big);
    expect(res.status).toBe(413);
    expect((await res.json()).error.message).toMatch(/larger than the limit/);
  });

  it("GET answers 405 with a hint", async () => {
    const res = await fetch(`${baseUrl}/api/v1/compute`);
    expect(res.status).toBe(405);
    expect((await res.json()).error.message).toMatch(/POST/);
  });
});
