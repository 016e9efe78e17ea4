import { describe, expect, it } from "vitest";
import { setProbability, sweepEntropyRate } from "~/engine/sweep";
import { EngineInputError } from "~/engine/errors";

function h(p: number): number {
  // Binary entropy from the definition (Shannon 1948).
  return p === 0 || p === 1 ? 0 : -p * Math.log2(p) - (1 - p) * Math.log2(1 - p);
}

const buoy = { family: "two-state", alphabet: ["calm", "swell"], a: 0.1, b: 0.3 };

describe("sweepEntropyRate", () => {
  it("sweeps a two-state parameter against the closed form", () => {
    const { points } = sweepEntropyRate(buoy, { parameter: { kind: "two-state", name: "a" }, from: 0.1, to: 0.9, steps: 9 });
    expect(points).toHaveLength(9);
    expect(points[0].x).toBe(0.1);
    expect(points[8].x).toBe(0.9);
    for (const pt of points) {
      // (b·h(a) + a·h(b))/(a + b), derivable from the definition.
      expect(pt.bits).toBeCloseTo((0.3 * h(pt.x) + pt.x * h(0.3)) / (pt.x + 0.3), 13);
    }
  });

  it("gives null with a reason where the chain has several closed classes, never NaN", () => {
    const { points } = sweepEntropyRate({ ...buoy, b: 0 }, { parameter: { kind: "two-state", name: "a" }, from: 0, to: 0.5, steps: 3 });
    expect(points[0]).toEqual({ x: 0, bits: null, reason: expect.stringMatching(/2 closed classes/) });
    // a > 0, b = 0: state "swell" absorbs; one closed class, rate 0.
    expect(points[1].bits).toBe(0);
    for (const pt of points) expect(Number.isNaN(pt.bits)).toBe(false);
  });

  it("sets a matrix entry and rescales the rest of the row proportionally", () => {
    expect(setProbability([0.5, 0.3, 0.2], 0, 0.8)).toEqual([0.8, expect.closeTo(0.12, 15), expect.closeTo(0.08, 15)]);
    expect(setProbability([1, 0, 0], 0, 0.4)).toEqual([0.4, 0.3, 0.3]);
    const model = { family: "markov", alphabet: ["a", "b"], P: [[0.5, 0.5], [0.5, 0.5]] };
    const { points } = sweepEntropyRate(model, { parameter: { kind: "entry", row: 0, col: 1 }, from: 0.2, to: 0.2, steps: 1 });
    // P = [[0.8, 0.2], [0.5, 0.5]] is the two-state chain a = 0.2, b = 0.5 (derivable).
    expect(points[0].bits).toBeCloseTo((0.5 * h(0.2) + 0.2 * h(0.5)) / 0.7, 13);
  });

  it("sweeps one i.i.d. probability", () => {
    const { points } = sweepEntropyRate({ family: "iid", alphabet: ["0", "1"], p: [0.5, 0.5] }, { parameter: { kind: "iid", index: 0 }, from: 0, to: 1, steps: 5 });
    expect(points.map((p) => p.bits)).toEqual([0, h(0.25), 1, h(0.75), 0].map((v) => expect.closeTo(v, 14)));
  });

  it("rejects bad sweeps with EngineInputError", () => {
    expect(() => sweepEntropyRate(buoy, { parameter: { kind: "two-state", name: "a" }, from: 0, to: 1, steps: 202 })).toThrow(/201/);
    expect(() => sweepEntropyRate(buoy, { parameter: { kind: "two-state", name: "a" }, from: -0.1, to: 1, steps: 3 })).toThrow(EngineInputError);
    expect(() => sweepEntropyRate(buoy, { parameter: { kind: "iid", index: 0 }, from: 0, to: 1, steps: 3 })).toThrow(/i\.i\.d\. model/);
    expect(() => sweepEntropyRate({ family: "iid", alphabet: ["a"], p: [2] }, { parameter: { kind: "iid", index: 0 }, from: 0, to: 1, steps: 3 })).toThrow(EngineInputError);
    expect(() =>
      sweepEntropyRate({ family: "markov", alphabet: ["a", "b"], P: [[0.5, 0.5], [0.5, 0.5]] }, { parameter: { kind: "entry", row: 2, col: 0 }, from: 0, to: 1, steps: 3 }),
    ).toThrow(/row 2/);
  });
});
