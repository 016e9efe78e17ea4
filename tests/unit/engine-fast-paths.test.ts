// Fast paths of the product path, each compared with the route it replaces or shortcuts, on random
// inputs. Scenario: a fictional warehouse robot's floor graphs (bays joined by aisles, weighted by
// use) and the relay chains of a fictional coastal buoy network.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { computeFigures, graphWalkRenyi, graphWalkRenyiRoute, prepareChain } from "~/engine/compute";
import { graphWalkClosedForm, graphWalkMatrix, type WeightedEdges } from "~/engine/entropy-rate";
import { howardMaxMeanCycle, logGraph, minEntropyRateFromHoward, minEntropyRateHoward, minEntropyRateKarp, reversibleMinEntropyRate } from "~/engine/min-entropy";
import { prepareRenyi, prepareRenyiScaled, prepareReversibleRenyi, renyiEntropyRate, reversibleRenyiEntropyRate, reversibleRenyiFitsBudget } from "~/engine/renyi";
import { EngineNumericError, stationaryIterative, stationaryReversible } from "~/engine/stationary";
import { sparseFromTriples } from "~/engine/sparse";
import { labelResolver, labelText, parseComputeRequest } from "~/engine/validate";
import { verifyFigures, verifyValidated } from "~/engine/verification";
import type { Label } from "~/engine/schema";

const RUNS = { numRuns: 40, seed: 20261203 };
/** Two exact-in-principle routes differing by rounding only (common practice, no source). */
const ROUNDING = 1e-12;
/** The spanning-tree μ against Gauss–Seidel stopped at ‖μP − μ‖₁ ≤ 1e-14. */
const ITERATIVE = 1e-10;

/** A connected floor graph: a ring of bays plus random aisles (loops and parallel aisles included). */
const floorArb = fc.integer({ min: 2, max: 40 }).chain((n) =>
  fc.tuple(
    fc.constant(n),
    fc.array(fc.integer({ min: 1, max: 9 }), { minLength: n, maxLength: n }),
    fc.array(fc.tuple(fc.nat(n - 1), fc.nat(n - 1), fc.double({ min: 0.01, max: 50, noNaN: true })), { maxLength: 3 * n }),
  ),
);

function edgesOf(n: number, ring: number[], extra: [number, number, number][]): WeightedEdges {
  const all: [number, number, number][] = [...ring.map((w, i) => [i, (i + 1) % n, w] as [number, number, number]), ...extra];
  return { u: Int32Array.from(all, (e) => e[0]), v: Int32Array.from(all, (e) => e[1]), w: Float64Array.from(all, (e) => e[2]) };
}

describe("detailed-balance stationary law (the second route of a graph walk's μ)", () => {
  it("agrees with Gauss–Seidel and the closed form on random floor graphs", () => {
    fc.assert(
      fc.property(floorArb, ([n, ring, extra]) => {
        const E = edgesOf(n, ring, extra);
        const P = graphWalkMatrix(n, E);
        const rev = stationaryReversible(P)!;
        expect(rev).not.toBeNull();
        expect(rev.balanceDefect).toBeLessThanOrEqual(ROUNDING);
        const gs = stationaryIterative(P, { tolerance: 1e-14, maxIterations: 50_000 });
        const cf = graphWalkClosedForm(n, E).stationary;
        for (let i = 0; i < n; i++) {
          expect(Math.abs(rev.mu[i] - gs.mu[i])).toBeLessThanOrEqual(ITERATIVE);
          expect(Math.abs(rev.mu[i] - cf[i])).toBeLessThanOrEqual(ROUNDING);
        }
      }),
      RUNS,
    );
  });

  it("reports a chain that is not reversible by its balance defect, and gives up on a one-way pattern", () => {
    // Three relays passing readings round mostly one way: symmetric pattern, not reversible.
    const P = sparseFromTriples(3, Int32Array.from([0, 0, 1, 1, 2, 2]), Int32Array.from([1, 2, 2, 0, 0, 1]), Float64Array.from([0.9, 0.1, 0.9, 0.1, 0.9, 0.1]));
    expect(stationaryReversible(P)!.balanceDefect).toBeGreaterThan(0.5);
    const cycle = sparseFromTriples(3, Int32Array.from([0, 1, 2]), Int32Array.from([1, 2, 0]), Float64Array.from([1, 1, 1]));
    expect(stationaryReversible(cycle)).toBeNull();
  });
});

describe("graph-walk min-entropy closed form", () => {
  it("rejects a μ that is not a positive law", () => {
    const P = graphWalkMatrix(2, edgesOf(2, [1, 1], []));
    expect(() => reversibleMinEntropyRate(P, [1])).toThrow(EngineNumericError);
    expect(() => reversibleMinEntropyRate(P, [1, 0])).toThrow(/must be positive/);
  });

  it("equals Karp and Howard on random floor graphs", () => {
    fc.assert(
      fc.property(floorArb, ([n, ring, extra]) => {
        const E = edgesOf(n, ring, extra);
        const P = graphWalkMatrix(n, E);
        const cf = reversibleMinEntropyRate(P, graphWalkClosedForm(n, E).stationary).bits;
        expect(Math.abs(cf - minEntropyRateKarp(P).bits)).toBeLessThanOrEqual(ROUNDING);
        expect(Math.abs(cf - minEntropyRateHoward(P).rate.bits)).toBeLessThanOrEqual(ROUNDING);
      }),
      RUNS,
    );
  });

  it("worked by hand on a three-bay floor", () => {
    // Derived by hand (common practice, no source): dock–aisle 2 (twice, merged to 4), aisle–rack 1,
    // rack loop 3. W = (4, 5, 4). Ratios w/√(WᵢWⱼ): 4/√20, 1/√20, 3/4; the largest is 4/√20.
    const E: WeightedEdges = { u: Int32Array.from([0, 0, 1, 2]), v: Int32Array.from([1, 1, 2, 2]), w: Float64Array.from([2, 2, 1, 3]) };
    expect(reversibleMinEntropyRate(graphWalkMatrix(3, E), graphWalkClosedForm(3, E).stationary).bits).toBeCloseTo(-Math.log2(4 / Math.sqrt(20)), 14);
  });

  it("is what compute publishes, and verification checks it against a second route", () => {
    const nodes = ["dock", "aisle", "rack", "charger"];
    const r = computeFigures({ model: { family: "graph-walk", nodes, edges: [["dock", "aisle", 2], ["aisle", "rack", 1], ["rack", "charger", 5], ["charger", "dock", 1], ["rack", "rack", 3]] } });
    expect(r.closedClasses[0].minEntropyMethod).toMatch(/^closed form/);
    const check = r.verification.checks.find((c) => c.figure === "minEntropyRate.bits")!;
    expect(check.routes[1].method).toBe("Karp");
    expect(check.passed).toBe(true);
  });
});

describe("shared Rényi preparation", () => {
  const chainArb = fc.integer({ min: 2, max: 8 }).chain((n) =>
    fc.array(fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: n, maxLength: n }), { minLength: n, maxLength: n }).map((rows) => {
      const data = new Float64Array(n * n);
      rows.forEach((row, i) => {
        row[(i + 1) % n] += 0.1; // the ring keeps it irreducible
        const s = row.reduce((a, b) => a + b, 0);
        row.forEach((x, j) => (data[i * n + j] = x / s));
      });
      return { n, data };
    }),
  );

  it("gives exactly the unshared figures for every order, and Howard's min-entropy", () => {
    fc.assert(
      fc.property(chainArb, fc.constantFrom(0.5, 2, 4), (P, alpha) => {
        const prep = prepareRenyi(P);
        expect(renyiEntropyRate(prep, alpha).bits).toBe(renyiEntropyRate(P, alpha).bits);
        expect(minEntropyRateFromHoward(prep.graph, prep.howard!).rate.bits).toBe(minEntropyRateHoward(P).rate.bits);
      }),
      RUNS,
    );
  });

  it("any scaling bias gives Howard's figure; −½ ln μ on floor graphs, random biases on chains", () => {
    /** Two Perron iterations on similar matrices, each to a 1e-14 bracket (common practice, no source). */
    const SIMILAR = 1e-10;
    fc.assert(
      fc.property(floorArb, fc.constantFrom(0.5, 2, 4), ([n, ring, extra], alpha) => {
        const E = edgesOf(n, ring, extra);
        const P = graphWalkMatrix(n, E);
        const bias = Float64Array.from(graphWalkClosedForm(n, E).stationary, (m) => -0.5 * Math.log(m));
        expect(Math.abs(renyiEntropyRate(prepareRenyiScaled(P, bias), alpha).bits - renyiEntropyRate(P, alpha).bits)).toBeLessThanOrEqual(SIMILAR);
      }),
      RUNS,
    );
    fc.assert(
      fc.property(chainArb, fc.constantFrom(0.5, 2), fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: 8, maxLength: 8 }), (P, alpha, b) => {
        const bias = b.slice(0, P.n);
        expect(Math.abs(renyiEntropyRate(prepareRenyiScaled(P, bias), alpha).bits - renyiEntropyRate(P, alpha).bits)).toBeLessThanOrEqual(SIMILAR);
      }),
      RUNS,
    );
    expect(() => prepareRenyiScaled(graphWalkMatrix(2, edgesOf(2, [1, 1], [])), [0])).toThrow(EngineNumericError);
  });

  it("gives exactly the unshared symmetric-route figures on floor graphs", () => {
    fc.assert(
      fc.property(floorArb, fc.constantFrom(0.5, 2, 4), ([n, ring, extra], alpha) => {
        const P = graphWalkMatrix(n, edgesOf(n, ring, extra));
        const prep = prepareReversibleRenyi(P);
        let shared: number | string;
        let direct: number | string;
        try {
          shared = reversibleRenyiEntropyRate(prep, alpha).bits;
        } catch (e) {
          shared = (e as Error).message;
        }
        try {
          direct = reversibleRenyiEntropyRate(P, alpha).bits;
        } catch (e) {
          direct = (e as Error).message;
        }
        expect(shared).toBe(direct);
        expect(graphWalkRenyiRoute(P)(alpha)).toEqual(graphWalkRenyi(P, alpha));
      }),
      RUNS,
    );
  });

  it("the symmetric route refuses at once a budget below one Lanczos restart", () => {
    const P = graphWalkMatrix(50, edgesOf(50, Array.from({ length: 50 }, () => 1), [[0, 25, 3]]));
    expect(reversibleRenyiFitsBudget(P, 1000)).toBe(false);
    expect(reversibleRenyiFitsBudget(P, 1e7)).toBe(true);
    expect(() => reversibleRenyiEntropyRate(P, 2, { workBudget: 1000 })).toThrow(EngineNumericError);
    expect(() => reversibleRenyiEntropyRate(P, 2, { workBudget: 1000 })).toThrow(/smaller than one Lanczos restart/);
  });

  it("Howard's inlined cycle sums keep the maximum cycle mean of a hand-made ring", () => {
    // A ring of four relays (hand computation, common practice, no source): the best cycles are
    // 1 ⇄ 2 (ln(0.5·0.75)/2) and 0 → 3 → 2 → 1 → 0 (ln(0.5·0.75·0.75·0.5)/4), the same mean.
    const P = sparseFromTriples(4, Int32Array.from([0, 0, 1, 1, 2, 2, 3, 3]), Int32Array.from([1, 3, 0, 2, 1, 3, 2, 0]), Float64Array.from([0.5, 0.5, 0.5, 0.5, 0.75, 0.25, 0.75, 0.25]));
    expect(howardMaxMeanCycle(logGraph(P)).maxMeanLog).toBeCloseTo(Math.log(0.375) / 2, 14);
  });
});

describe("label resolution", () => {
  const labelArb = fc.oneof(fc.integer({ min: -3, max: 40 }), fc.integer({ min: 0, max: 40 }).map(String), fc.constantFrom("dock", "bay-1", "1.5", "-0"), fc.double({ min: -2, max: 40, noNaN: true }));

  it("answers like the label-text map for numbers, numeric strings and names", () => {
    fc.assert(
      fc.property(fc.uniqueArray(labelArb, { selector: (l) => labelText(l), maxLength: 30 }), fc.array(labelArb, { maxLength: 40 }), (labels, queries) => {
        const map = new Map<string, number>();
        labels.forEach((l, i) => map.set(labelText(l), i));
        const resolve = labelResolver(labels, map);
        for (const q of [...queries, ...labels]) expect(resolve(q as Label)).toBe(map.get(labelText(q as Label)));
      }),
      RUNS,
    );
  });
});

describe("verification without the second parse", () => {
  it("records the same checks as verifyFigures", () => {
    const models = [
      { family: "graph-walk", nodes: [0, 1, 2, "3"], edges: [[0, 1, 2], [1, 2, 1], [2, "3", 4], [3, 0, 1], [2, 2, 1]] },
      { family: "markov", alphabet: ["calm", "swell", "storm"], P: [[0.7, 0.2, 0.1], [0.3, 0.5, 0.2], [0.2, 0.3, 0.5]] },
      { family: "two-state", alphabet: ["up", "down"], a: 0.1, b: 0.3 },
    ];
    for (const model of models) {
      const parsed = parseComputeRequest({ model });
      if (!parsed.ok) throw new Error(parsed.error.message);
      const r = computeFigures({ model });
      const { verification, ...rest } = r;
      const prepared = model.family === "markov" || model.family === "graph-walk" || model.family === "two-state" ? prepareChain(parsed.value.model).chain : null;
      expect(verifyValidated(parsed.value, rest, prepared)).toEqual(verification);
      expect(verifyFigures({ model }, rest)).toEqual(verification);
    }
  });

  it("a 1,500-bay floor (above the dense limit) passes with the spanning-tree route", () => {
    const n = 1500;
    const nodes = Array.from({ length: n }, (_, i) => i);
    const edges: [number, number, number][] = nodes.map((i) => [i, (i + 1) % n, 1 + (i % 7)]);
    for (let i = 0; i < n; i += 3) edges.push([i, (i * 37 + 11) % n, 2]);
    const r = computeFigures({ model: { family: "graph-walk", nodes, edges } });
    expect(r.verification.passed).toBe(true);
    const mu = r.verification.checks.find((c) => c.figure.startsWith("stationary"))!;
    expect(mu.routes[1].method).toBe("detailed balance along a spanning tree of P");
    expect(r.verification.checks.find((c) => c.figure === "minEntropyRate.bits")!.routes[1].method).toBe("Howard policy iteration");
  });
});
