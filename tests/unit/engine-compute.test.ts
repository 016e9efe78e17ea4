import { describe, expect, it } from "vitest";
import { computeFigures, type ComputeResult } from "~/engine/compute";
import { EngineInputError } from "~/engine/errors";
import { ENGINE_VERSION } from "~/engine/version";

function h(p: number): number {
  // Binary entropy by its definition (Shannon 1948).
  return p === 0 || p === 1 ? 0 : -p * Math.log2(p) - (1 - p) * Math.log2(1 - p);
}

function compute(model: unknown, extra: Record<string, unknown> = {}): ComputeResult {
  return computeFigures({ model, ...extra });
}

function expectPlainJson(r: ComputeResult) {
  expect(JSON.parse(JSON.stringify(r))).toEqual(r);
}

describe("i.i.d. source (a fictional lab's ring-oscillator bit pairs)", () => {
  const model = { family: "iid", alphabet: ["00", "01", "10", "11"], p: [0.5, 0.25, 0.125, 0.125] };
  const r = compute(model, { renyiOrders: [3] });

  it("gives the closed forms", () => {
    // Derivable from the definitions: H = Σ −p log₂ p = 0.5 + 0.5 + 0.375 + 0.375.
    expect(r.entropyRate!.bits).toBeCloseTo(1.75, 14);
    expect(r.entropyRate!.nats).toBeCloseTo(1.75 * Math.LN2, 14);
    expect(r.minEntropyRate!.bits).toBeCloseTo(1, 14);
    // Rényi of order α: (1/(1−α)) log₂ Σ pᵢ^α, derivable from the definition.
    const renyi = (a: number) => Math.log2(model.p.reduce((s, x) => s + x ** a, 0)) / (1 - a);
    expect(r.renyi.map((x) => x.order)).toEqual([0.5, 2, 3, 4]);
    for (const x of r.renyi) expect(x.bits).toBeCloseTo(renyi(x.order), 12);
  });

  it("reports the contract fields", () => {
    expect(r.engineVersion).toBe(ENGINE_VERSION);
    expect(r.family).toBe("iid");
    expect(r.stationary).toEqual(model.p);
    expect(r.states).toEqual(model.alphabet);
    expect(r.irreducible).toBe(true);
    expect(r.period).toBe(1);
    expect(r.blockEntropies).toHaveLength(12);
    // i.i.d.: H(Xⁿ) = n·H.
    expect(r.blockEntropies[4].joint).toBeCloseTo(5 * 1.75, 12);
    expect(r.verification.passed).toBe(true);
    expectPlainJson(r);
  });

  it("treats zero-probability symbols as transient", () => {
    const z = compute({ family: "iid", alphabet: ["a", "b", "c"], p: [0.5, 0, 0.5] });
    expect(z.irreducible).toBe(false);
    expect(z.entropyRate!.bits).toBeCloseTo(1, 14);
    expect(z.closedClasses[0].states).toEqual([0, 2]);
    expect(z.verification.passed).toBe(true);
  });
});

describe("two-state chain (buoy: calm / swell)", () => {
  it("matches the closed form (b·h(a) + a·h(b))/(a + b) and μ = (b, a)/(a + b)", () => {
    const r = compute({ family: "two-state", alphabet: ["calm", "swell"], a: 0.1, b: 0.3 });
    // h(0.1) = 0.4689955935892812 (REFERENCES: derivable); h(0.3) from the definition.
    expect(h(0.1)).toBeCloseTo(0.4689955935892812, 15);
    expect(r.entropyRate!.bits).toBeCloseTo((0.3 * 0.4689955935892812 + 0.1 * h(0.3)) / 0.4, 14);
    expect(r.stationary![0]).toBeCloseTo(0.75, 15);
    expect(r.stationary![1]).toBeCloseTo(0.25, 15);
    // Min-entropy: the best cycle is the self-loop of probability 0.9 (derivable: 0.9 > √(0.1·0.3) and > 0.7).
    expect(r.minEntropyRate!.bits).toBeCloseTo(-Math.log2(0.9), 12);
    expect(r.verification.passed).toBe(true);
  });

  it("flags the alternating chain a = b = 1 as periodic with rate 0", () => {
    const r = compute({ family: "two-state", alphabet: ["up", "down"], a: 1, b: 1 });
    expect(r.period).toBe(2);
    expect(r.entropyRate!.bits).toBe(0);
    expect(r.verification.passed).toBe(true);
  });

  it("has no single rate when both states are absorbing", () => {
    const r = compute({ family: "two-state", alphabet: ["up", "down"], a: 0, b: 0 });
    expect(r.entropyRate).toBeNull();
    expect(r.stationary).toBeNull();
    expect(r.message).toMatch(/depends on the initial distribution/);
    expect(r.closedClasses.map((c) => c.states)).toEqual([[0], [1]]);
    expectPlainJson(r);
  });
});

describe("Markov chains", () => {
  it("computes an irreducible order-1 chain by GTH", () => {
    // A doubly stochastic chain: μ uniform and each row has entropy 1 bit (derivable).
    const r = compute({ family: "markov", alphabet: ["a", "b", "c"], P: [[0.5, 0.5, 0], [0, 0.5, 0.5], [0.5, 0, 0.5]] });
    expect(r.solver.method).toBe("GTH state reduction");
    for (const m of r.stationary!) expect(m).toBeCloseTo(1 / 3, 15);
    expect(r.entropyRate!.bits).toBeCloseTo(1, 14);
    expect(r.irreducible).toBe(true);
    expect(r.verification.passed).toBe(true);
  });

  it("reports the period of a cyclic chain", () => {
    const r = compute({ family: "markov", alphabet: ["a", "b", "c"], P: [[0, 1, 0], [0, 0, 1], [1, 0, 0]] });
    expect(r.period).toBe(3);
    expect(r.entropyRate!.bits).toBe(0);
    expect(r.notes.join(" ")).toMatch(/periodic \(period 3\)/);
    expect(r.verification.passed).toBe(true);
  });

  it("gives a reducible chain with one closed class that class's figures, transient states 0", () => {
    const r = compute({ family: "markov", alphabet: ["boot", "run", "log"], P: [[0.2, 0.8, 0], [0, 0.5, 0.5], [0, 0.5, 0.5]] });
    expect(r.irreducible).toBe(false);
    expect(r.stationary).toEqual([0, 0.5, 0.5]);
    expect(r.entropyRate!.bits).toBeCloseTo(1, 14);
    expect(r.minEntropyRate!.bits).toBeCloseTo(1, 14);
    expect(r.classes.find((c) => c.states.includes(0))!.closed).toBe(false);
    expect(r.verification.passed).toBe(true);
  });

  it("reports each closed class when there are several", () => {
    const r = compute({ family: "markov", alphabet: ["start", "left", "right"], P: [[0.5, 0.25, 0.25], [0, 1, 0], [0, 0, 1]] });
    expect(r.entropyRate).toBeNull();
    expect(r.minEntropyRate).toBeNull();
    expect(r.message).toMatch(/2 closed classes/);
    expect(r.closedClasses).toHaveLength(2);
    expect(r.closedClasses.map((c) => c.labels)).toEqual([["left"], ["right"]]);
    for (const c of r.closedClasses) expect(c.entropyRate.bits).toBe(0);
    expect(r.verification.passed).toBe(true);
    expectPlainJson(r);
  });

  it("gives an order-2 chain the same figures as its lifted first-order chain", () => {
    const P2 = [
      [0.9, 0.1],
      [0.4, 0.6],
      [0.3, 0.7],
      [0.5, 0.5],
    ];
    const k2 = compute({ family: "markov", alphabet: ["a", "b"], order: 2, P: P2 });
    // The lift written out by hand: context (x, y) → (y, z) with probability P2[xy][z].
    const lifted = [
      [0.9, 0.1, 0, 0],
      [0, 0, 0.4, 0.6],
      [0.3, 0.7, 0, 0],
      [0, 0, 0.5, 0.5],
    ];
    const k1 = compute({ family: "markov", alphabet: ["a·a", "a·b", "b·a", "b·b"], P: lifted });
    expect(k2.states).toEqual(["a·a", "a·b", "b·a", "b·b"]);
    expect(k2.entropyRate!.bits).toBeCloseTo(k1.entropyRate!.bits, 13);
    expect(k2.minEntropyRate!.bits).toBeCloseTo(k1.minEntropyRate!.bits, 13);
    k2.stationary!.forEach((m, i) => expect(m).toBeCloseTo(k1.stationary![i], 13));
    k2.renyi.forEach((x, i) => expect(x.bits).toBeCloseTo(k1.renyi[i].bits, 11));
    expect(k2.symbolDistribution).toHaveLength(2);
    expect(k2.verification.passed).toBe(true);
  });

  it("solves a large sparse chain iteratively (warehouse robot on a ring of 2,000 bays)", () => {
    const n = 2000;
    const alphabet = Array.from({ length: n }, (_, i) => `bay${i}`);
    const transitions: [number, number, number][] = [];
    for (let i = 0; i < n; i++) transitions.push([i, i, 0.5], [i, (i + 1) % n, 0.3], [i, (i + n - 1) % n, 0.2]);
    const r = compute({ family: "markov", alphabet, transitions });
    expect(r.solver.method).toBe("symmetric Gauss–Seidel");
    // Doubly stochastic: μ uniform; every row has the entropy of (0.5, 0.3, 0.2) (derivable).
    for (const m of r.stationary!) expect(m).toBeCloseTo(1 / n, 12);
    const row = -(0.5 * Math.log2(0.5) + 0.3 * Math.log2(0.3) + 0.2 * Math.log2(0.2));
    expect(r.entropyRate!.bits).toBeCloseTo(row, 9);
    expect(r.closedClasses[0].minEntropyMethod).toBe("Howard policy iteration");
    expect(r.minEntropyRate!.bits).toBeCloseTo(1, 9);
    expect(r.verification.passed).toBe(true);
  });
});

describe("random walk on a weighted graph (warehouse floor)", () => {
  it("gives log₂ d on a d-regular graph and period 2 when bipartite", () => {
    // A 4-cycle: 2-regular and bipartite (REFERENCES: standard / derivable).
    const r = compute({ family: "graph-walk", nodes: ["n", "e", "s", "w"], edges: [["n", "e", 1], ["e", "s", 1], ["s", "w", 1], ["w", "n", 1]] });
    expect(r.entropyRate!.bits).toBeCloseTo(1, 14);
    expect(r.period).toBe(2);
    expect(r.stationary).toEqual([0.25, 0.25, 0.25, 0.25]);
    expect(r.verification.passed).toBe(true);
  });

  it("gives log₂(m − 1) on the complete graph K₅", () => {
    const nodes = ["a", "b", "c", "d", "e"];
    const edges = nodes.flatMap((u, i) => nodes.slice(i + 1).map((v) => [u, v, 2]));
    const r = compute({ family: "graph-walk", nodes, edges });
    expect(r.entropyRate!.bits).toBeCloseTo(2, 14);
    expect(r.period).toBe(1);
    expect(r.verification.passed).toBe(true);
  });

  it("matches H(edge weights / 2W) − H(node weights / 2W) with a self-loop counted once", () => {
    const r = compute({ family: "graph-walk", nodes: ["dock", "aisle", "rack"], edges: [["dock", "aisle", 1], ["aisle", "rack", 2], ["rack", "rack", 1]] });
    // Node weights 1, 3, 3 (the loop adds 1 to rack once), 2W = 7; the loop is one directed entry.
    const H = (xs: number[]) => xs.reduce((s, x) => s - x * Math.log2(x), 0);
    const expected = H([1, 1, 2, 2, 1].map((w) => w / 7)) - H([1, 3, 3].map((w) => w / 7));
    expect(r.entropyRate!.bits).toBeCloseTo(expected, 13);
    expect(r.stationary!.map((x) => x * 7)).toEqual([1, 3, 3].map((x) => expect.closeTo(x, 12)));
  });

  it("treats a disconnected graph as reducible with one closed class per component", () => {
    const r = compute({
      family: "graph-walk",
      nodes: ["a", "b", "c", "x", "y", "z"],
      edges: [["a", "b", 1], ["b", "c", 1], ["c", "a", 1], ["x", "y", 5], ["y", "z", 5], ["z", "x", 5]],
    });
    expect(r.entropyRate).toBeNull();
    expect(r.irreducible).toBe(false);
    expect(r.message).toMatch(/2 connected components/);
    expect(r.closedClasses).toHaveLength(2);
    for (const c of r.closedClasses) {
      expect(c.entropyRate.bits).toBeCloseTo(1, 14); // a triangle is K₃: log₂ 2
      for (const m of c.stationary) expect(m).toBeCloseTo(1 / 3, 15);
    }
    expect(r.verification.passed).toBe(true);
  });
});

describe("hidden Markov source (a buoy's sea state seen through a noisy radio link)", () => {
  const p = 0.1;
  const eps = 0.01;
  const model = { family: "hidden", states: ["calm", "rough"], alphabet: ["0", "1"], P: [[1 - p, p], [p, 1 - p]], B: [[1 - eps, eps], [eps, 1 - eps]] };
  const r = compute(model, { blockLengths: 14, seed: 7 });

  it("returns ordered bounds and a rate inside them", () => {
    expect(r.bounds!.length).toBeGreaterThan(5);
    for (const b of r.bounds!) expect(b.lower).toBeLessThanOrEqual(b.upper + 1e-12);
    const last = r.bounds![r.bounds!.length - 1];
    expect(r.entropyRate!.bits).toBeGreaterThanOrEqual(last.lower);
    expect(r.entropyRate!.bits).toBeLessThanOrEqual(last.upper);
    // Derivable: H(Y|X) = h(ε) ≤ H(Y) ≤ H(X, Y) = h(p) + h(ε).
    expect(r.entropyRate!.bits).toBeGreaterThan(h(eps));
    expect(r.entropyRate!.bits).toBeLessThan(h(p) + h(eps));
  });

  it("agrees with the small-noise expansion h(p) + 2(1 − 2p)·log₂((1 − p)/p)·ε", () => {
    // Jacquet, Seroussi and Szpankowski (2008); coefficient from memory. At ε = 1e-3 the first-order
    // term is 5.1e-3 and the O(ε²) remainder must be far smaller than it.
    const e = 1e-3;
    const small = compute({ ...model, B: [[1 - e, e], [e, 1 - e]] }, { blockLengths: 14 });
    const first = 2 * (1 - 2 * p) * Math.log2((1 - p) / p) * e;
    expect(Math.abs(small.entropyRate!.bits - (h(p) + first))).toBeLessThan(2e-4);
    expect(small.entropyRate!.bits - h(p)).toBeGreaterThan(0.9 * first);
  });

  it("runs the seeded Monte Carlo estimate and verifies", () => {
    expect(r.monteCarlo!.seed).toBe(7);
    expect(r.monteCarlo!.ci95[0]).toBeLessThan(r.monteCarlo!.ci95[1]);
    expect(r.minEntropyRate).toBeNull();
    expect(r.stationary![0]).toBeCloseTo(0.5, 15);
    expect(r.verification.passed).toBe(true);
    expectPlainJson(r);
    const again = compute(model, { blockLengths: 14, seed: 7 });
    expect(again.monteCarlo).toEqual(r.monteCarlo);
  });
});

describe("bad input", () => {
  it("throws EngineInputError carrying { message, issues }", () => {
    let caught: unknown;
    try {
      computeFigures({ model: { family: "iid", alphabet: ["a", "b"], p: [0.5, 0.6] } });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(EngineInputError);
    const err = caught as EngineInputError;
    expect(err.toJSON()).toEqual({ message: "p sums to 1.1, not 1 (off by 0.1)", issues: [{ path: "model.p", message: "p sums to 1.1, not 1 (off by 0.1)" }] });
  });

  it("passes the normalise notes through to the result", () => {
    const r = computeFigures({ model: { family: "iid", alphabet: ["a", "b"], p: [1, 1] }, normalize: true });
    expect(r.entropyRate!.bits).toBeCloseTo(1, 15);
    expect(r.notes[0]).toBe("p summed to 2; rescaled to sum to 1");
  });
});
