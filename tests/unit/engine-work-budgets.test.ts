// Work budgets and the symmetric Rényi route for reversible chains. Scenario: a fictional
// warehouse robot's floor graph (aisles weighted by how often the robot uses them).
import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { computeFigures, graphWalkRenyi, prepareChain } from "~/engine/compute";
import { renyiEntropyRate, reversibleRenyiEntropyRate } from "~/engine/renyi";
import { EngineNumericError, stationaryIterative } from "~/engine/stationary";
import { sparseFromTriples } from "~/engine/sparse";

const floor = {
  family: "graph-walk" as const,
  nodes: ["dock", "aisle-a", "aisle-b", "aisle-c", "charger", "pack"],
  edges: [
    ["dock", "aisle-a", 3],
    ["aisle-a", "aisle-b", 1],
    ["aisle-b", "aisle-c", 2],
    ["aisle-c", "pack", 5],
    ["pack", "dock", 1],
    ["aisle-a", "charger", 0.5],
    ["charger", "charger", 2],
    ["aisle-b", "pack", 4],
  ] as [string, string, number][],
};

/** (1/(1−α)) ln λ with λ the largest real eigenvalue of [Pᵢⱼ^α], from ml-matrix (a general-purpose library). */
function reference(P: number[][], alpha: number): number {
  const ev = new EigenvalueDecomposition(new Matrix(P.map((r) => r.map((v) => (v > 0 ? v ** alpha : 0)))));
  return Math.log(Math.max(...ev.realEigenvalues)) / (1 - alpha);
}

describe("symmetric Rényi route for reversible chains", () => {
  const { chain } = prepareChain(floor);
  const rows: number[][] = Array.from({ length: chain.n }, () => new Array(chain.n).fill(0));
  for (let i = 0; i < chain.n; i++) for (let p = chain.sparse.rowPtr[i]; p < chain.sparse.rowPtr[i + 1]; p++) rows[i][chain.sparse.col[p]] = chain.sparse.val[p];

  for (const alpha of [0.5, 2, 4, 30]) {
    it(`matches ml-matrix's eigenvalues at α = ${alpha}`, () => {
      const r = reversibleRenyiEntropyRate(chain.sparse, alpha);
      const want = reference(rows, alpha); // ml-matrix, general eigenvalue decomposition
      expect(Math.abs(r.nats - want)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(want)));
      expect(r.bracketBits[0]).toBeLessThanOrEqual(r.bits + 1e-12);
      expect(r.bracketBits[1]).toBeGreaterThanOrEqual(r.bits - 1e-12);
      // The general (non-symmetric) route must agree: derivable, the matrices are similar.
      expect(Math.abs(r.bits - renyiEntropyRate(chain.sparse, alpha).bits)).toBeLessThanOrEqual(1e-9);
    });
  }

  it("rejects a chain whose transition graph is not symmetric", () => {
    const cyc = sparseFromTriples(3, Int32Array.from([0, 1, 2]), Int32Array.from([1, 2, 0]), Float64Array.from([1, 1, 1]));
    expect(() => reversibleRenyiEntropyRate(cyc, 2)).toThrow(/not symmetric/);
    expect(graphWalkRenyi(cyc, 2)).toBeNull();
  });

  it("compute publishes graph-walk Rényi rates that pass verification", () => {
    const r = computeFigures({ model: floor, renyiOrders: [3] });
    expect(r.verification.passed).toBe(true);
    expect(r.renyi.map((x) => x.order)).toEqual([0.5, 2, 3, 4]);
    for (const x of r.renyi) expect(Math.abs(x.nats - reference(rows, x.order))).toBeLessThanOrEqual(1e-9); // ml-matrix
  });
});

describe("work budgets", () => {
  // A line of relays with drift (a birth–death chain): it mixes slowly and its Perron vectors are
  // far from uniform, so neither iteration can finish in a few steps.
  const n = 400;
  const T: [number, number, number][] = [];
  for (let i = 0; i < n; i++) {
    const up = i + 1 < n ? 0.5 : 0;
    const down = i > 0 ? 0.3 : 0;
    if (up) T.push([i, i + 1, up]);
    if (down) T.push([i, i - 1, down]);
    T.push([i, i, 1 - up - down]);
  }
  T.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  const ring = sparseFromTriples(n, Int32Array.from(T, (t) => t[0]), Int32Array.from(T, (t) => t[1]), Float64Array.from(T, (t) => t[2]));

  it("a Perron root that does not converge within its budget throws and says why", () => {
    expect(() => renyiEntropyRate(ring, 2.5, { workBudget: 5_000 })).toThrow(EngineNumericError);
    expect(() => renyiEntropyRate(ring, 2.5, { workBudget: 5_000 })).toThrow(/work budget/);
    expect(() => renyiEntropyRate(ring, 2.5, { workBudget: 0 })).toThrow(EngineNumericError);
  });

  it("the iterative stationary solver stops at its budget and reports it", () => {
    const r = stationaryIterative(ring, { tolerance: 1e-15, workBudget: 7_000 });
    expect(r.work).toBeLessThanOrEqual(7_000);
    expect(r.iterations).toBe(1);
    expect(r.converged).toBe(false);
    expect(r.mu.every((x) => Number.isFinite(x))).toBe(true);
    const full = stationaryIterative(ring, { tolerance: 1e-12 });
    expect(full.converged).toBe(true);
    expect(full.work).toBeGreaterThan(0);
    expect(() => stationaryIterative(ring, { workBudget: -1 })).toThrow(EngineNumericError);
  });
});
