import { describe, expect, it } from "vitest";
import {
  BOUNDS_ROUNDING_SLACK,
  HiddenSourceError,
  hiddenMonteCarlo,
  hiddenSourceBounds,
  studentTCentralProbability,
  studentTTwoSidedQuantile,
  type EmissionMatrix,
} from "../../app/engine/hidden";
import type { DenseMatrix } from "../../app/engine/types";

// A fictional coastal buoy network: a relay's link is good / fading / lost, and the shore
// station only logs whether each packet arrived.
const relayP: DenseMatrix = { n: 3, data: new Float64Array([0.9, 0.08, 0.02, 0.3, 0.6, 0.1, 0.2, 0.3, 0.5]) };
const relayB: EmissionMatrix = { states: 3, symbols: 2, data: new Float64Array([0.98, 0.02, 0.6, 0.4, 0, 1]) };
function stationary3(P: DenseMatrix): Float64Array {
  // Power iteration to convergence, adequate for this well-mixed 3-state chain.
  let v = new Float64Array([1 / 3, 1 / 3, 1 / 3]);
  for (let it = 0; it < 5000; it++) {
    const w = new Float64Array(3);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) w[j] += v[i] * P.data[i * 3 + j];
    v = w;
  }
  return v;
}
const relayMu = stationary3(relayP);

// A warehouse robot circulating deterministically around three stations, with a badge reader at each.
const rotationP: DenseMatrix = { n: 3, data: new Float64Array([0, 1, 0, 0, 0, 1, 1, 0, 0]) };
const rotationB: EmissionMatrix = { states: 3, symbols: 3, data: new Float64Array([1, 0, 0, 0, 1, 0, 0, 0, 1]) };
const uniform3 = new Float64Array([1 / 3, 1 / 3, 1 / 3]);

describe("hiddenSourceBounds: work budget", () => {
  const flipP: DenseMatrix = { n: 2, data: new Float64Array([0.8, 0.2, 0.3, 0.7]) };
  const noisyB: EmissionMatrix = { states: 2, symbols: 2, data: new Float64Array([0.9, 0.1, 0.25, 0.75]) };
  const flipMu = new Float64Array([0.6, 0.4]); // (b, a)/(a + b) for a = 0.2, b = 0.3 (derivable)
  // Every output string has positive probability, so level t holds 2^t strings and a pass to depth
  // d expands 2^d − 1 strings at s² + 2sk = 12 operations each.
  const unit = 2 * 2 + 2 * 2 * 2;

  it("stops at the deepest n whose pass fits the budget, and never exceeds it", () => {
    const exact = hiddenSourceBounds(flipP, noisyB, flipMu, { workBudget: unit * (2 ** 10 - 1) });
    expect(exact.n).toBe(10);
    expect(exact.work).toBe(unit * (2 ** 10 - 1));
    const short = hiddenSourceBounds(flipP, noisyB, flipMu, { workBudget: unit * (2 ** 10 - 1) - 1 });
    expect(short.n).toBe(9);
    expect(short.work).toBeLessThanOrEqual(short.budget);
    expect(short.budget).toBe(unit * (2 ** 10 - 1) - 1);
  });

  it("honours maxN", () => {
    const res = hiddenSourceBounds(flipP, noisyB, flipMu, { maxN: 5 });
    expect(res.n).toBe(5);
    expect(res.bounds.map((b) => b.n)).toEqual([1, 2, 3, 4, 5]);
  });

  it("defaults to maxN 40 and reaches it when pruning keeps the tree thin", () => {
    // After the first symbol the badge sequence is determined: 3 strings per level. The first pass
    // budgets for 3^t strings per level; the counts it finds allow a second pass to n = 40.
    const res = hiddenSourceBounds(rotationP, rotationB, uniform3, { workBudget: 1e5 });
    expect(res.n).toBe(40);
    expect(res.work).toBeLessThanOrEqual(1e5);
    expect(res.bounds[0].upper).toBeCloseTo(Math.log2(3), 14); // H(Y_1) of a uniform badge (derivable)
    for (const b of res.bounds.slice(1)) {
      expect(b.upper).toBe(0);
      expect(b.lower).toBe(0);
    }
  });

  it("meets the performance target: 4 states, binary output, n = 20 under the default budget", () => {
    // Not timed here (see bench/); this checks the default budget admits n = 20 for this shape.
    const P: DenseMatrix = {
      n: 4,
      data: new Float64Array([0.7, 0.1, 0.1, 0.1, 0.2, 0.5, 0.2, 0.1, 0.1, 0.3, 0.4, 0.2, 0.25, 0.25, 0.25, 0.25]),
    };
    const B: EmissionMatrix = { states: 4, symbols: 2, data: new Float64Array([0.9, 0.1, 0.2, 0.8, 0.5, 0.5, 0.3, 0.7]) };
    let mu = new Float64Array([0.25, 0.25, 0.25, 0.25]);
    for (let it = 0; it < 2000; it++) {
      const w = new Float64Array(4);
      for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) w[j] += mu[i] * P.data[i * 4 + j];
      mu = w;
    }
    const res = hiddenSourceBounds(P, B, mu);
    expect(res.n).toBeGreaterThanOrEqual(20);
    expect(res.work).toBeLessThanOrEqual(5e7);
  });
});

describe("hiddenSourceBounds: degenerate inputs stay finite", () => {
  it("handles a symbol that is never emitted and a state that emits deterministically", () => {
    const B: EmissionMatrix = { states: 3, symbols: 3, data: new Float64Array([0.98, 0.02, 0, 0.6, 0.4, 0, 0, 1, 0]) };
    const res = hiddenSourceBounds(relayP, B, relayMu, { maxN: 12 });
    for (const b of res.bounds) {
      expect(Number.isFinite(b.lower) && Number.isFinite(b.upper)).toBe(true);
      expect(b.upper).toBeLessThanOrEqual(1 + 1e-12); // only two symbols can occur
    }
    // Same source without the dead column: identical figures.
    const res2 = hiddenSourceBounds(relayP, relayB, relayMu, { maxN: 12 });
    for (let n = 0; n < 12; n++) {
      expect(res.bounds[n].upper).toBeCloseTo(res2.bounds[n].upper, 14);
      expect(res.bounds[n].lower).toBeCloseTo(res2.bounds[n].lower, 14);
    }
  });

  it("clamps rounding-level crossings and records them in notes, never beyond the slack", () => {
    // Near-noiseless observation: lower and upper agree to rounding from small n on.
    const eps = 1e-4;
    const P: DenseMatrix = { n: 2, data: new Float64Array([0.9, 0.1, 0.1, 0.9]) };
    const B: EmissionMatrix = { states: 2, symbols: 2, data: new Float64Array([1 - eps, eps, eps, 1 - eps]) };
    const res = hiddenSourceBounds(P, B, new Float64Array([0.5, 0.5]), { maxN: 18 });
    for (const b of res.bounds) expect(b.lower).toBeLessThanOrEqual(b.upper);
    for (const note of res.notes) expect(note).toMatch(/clamped/);
    expect(BOUNDS_ROUNDING_SLACK).toBe(1e-12);
  });

  it("rejects misuse with clear HiddenSourceErrors", () => {
    expect(() => hiddenSourceBounds(relayP, { ...relayB, states: 2 }, relayMu)).toThrow(/2 states, the hidden chain has 3/);
    expect(() => hiddenSourceBounds(relayP, { ...relayB, data: new Float64Array(5) }, relayMu)).toThrow(/expected 3×2/);
    expect(() => hiddenSourceBounds(relayP, relayB, new Float64Array(2))).toThrow(/2 entries/);
    expect(() => hiddenSourceBounds(relayP, relayB, uniform3)).toThrow(/not stationary/);
    expect(() => hiddenSourceBounds(relayP, relayB, new Float64Array([0.5, 0.5, 0.5]))).toThrow(/sums to/);
    expect(() => hiddenSourceBounds(relayP, relayB, relayMu, { maxN: 0 })).toThrow(/maxN/);
    expect(() => hiddenSourceBounds(relayP, relayB, relayMu, { maxN: 1e6 })).toThrow(/maxN must be an integer in 1/);
    expect(() => hiddenSourceBounds(relayP, relayB, relayMu, { workBudget: Number.NaN })).toThrow(/workBudget/);
    expect(() => hiddenSourceBounds(relayP, relayB, relayMu, { workBudget: 3 })).toThrow(/below the cost of n = 1/);
    const badP = { n: 3, data: Float64Array.from(relayP.data) };
    badP.data[4] = Number.NaN;
    expect(() => hiddenSourceBounds(badP, relayB, relayMu)).toThrow(HiddenSourceError);
  });
});

describe("hiddenMonteCarlo", () => {
  it("is reproducible from its seed and reports its inputs", () => {
    const a = hiddenMonteCarlo(relayP, relayB, relayMu, { length: 3000, runs: 5, seed: 12 });
    const b = hiddenMonteCarlo(relayP, relayB, relayMu, { length: 3000, runs: 5, seed: 12 });
    const c = hiddenMonteCarlo(relayP, relayB, relayMu, { length: 3000, runs: 5, seed: 13 });
    expect(b).toEqual(a);
    expect(c.estimateBits).not.toBe(a.estimateBits);
    expect(a).toMatchObject({ length: 3000, runs: 5, seed: 12 });
    expect(a.ci95[0]).toBeLessThan(a.estimateBits);
    expect(a.ci95[1]).toBeGreaterThan(a.estimateBits);
    // Half-width = t(0.975, 4)·SE (the method as documented).
    expect((a.ci95[1] - a.ci95[0]) / 2).toBeCloseTo(studentTTwoSidedQuantile(0.95, 4) * a.standardError, 12);
  });

  it("gives log₂3 / n with zero spread on the deterministic rotation (derivable from the definition)", () => {
    const mc = hiddenMonteCarlo(rotationP, rotationB, uniform3, { length: 500, runs: 4, seed: 1 });
    expect(mc.estimateBits).toBeCloseTo(Math.log2(3) / 500, 14);
    expect(mc.standardError).toBe(0);
    expect(mc.ci95[0]).toBe(mc.ci95[1]);
  });

  it("stays finite on 100000-symbol paths (scaled forward algorithm, no underflow)", () => {
    const mc = hiddenMonteCarlo(relayP, relayB, relayMu, { length: 100000, runs: 2, seed: 3 });
    expect(Number.isFinite(mc.estimateBits)).toBe(true);
    const bounds = hiddenSourceBounds(relayP, relayB, relayMu, { maxN: 16 });
    const last = bounds.bounds[bounds.n - 1];
    // Between the bounds up to Monte Carlo error (half-width well under 0.05 at this length).
    expect(mc.estimateBits).toBeGreaterThan(last.lower - 0.05);
    expect(mc.estimateBits).toBeLessThan(last.upper + 0.05);
  });

  it("rejects misuse", () => {
    expect(() => hiddenMonteCarlo(relayP, relayB, relayMu, { length: 0, runs: 5, seed: 1 })).toThrow(/length/);
    expect(() => hiddenMonteCarlo(relayP, relayB, relayMu, { length: 10, runs: 1, seed: 1 })).toThrow(/runs/);
    expect(() => hiddenMonteCarlo(relayP, relayB, relayMu, { length: 10, runs: 3, seed: 0.5 })).toThrow(/seed/);
    expect(() => hiddenMonteCarlo(relayP, { ...relayB, symbols: 3 }, relayMu, { length: 10, runs: 3, seed: 1 })).toThrow(HiddenSourceError);
  });
});

describe("studentTTwoSidedQuantile", () => {
  it("matches closed forms for 1 and 2 degrees of freedom (derivable from the definition)", () => {
    // df = 1 is the Cauchy law: t = tan(0.475π). df = 2: P(|T| ≤ t) = t/√(t² + 2), so t = 0.95·√(2/(1 − 0.95²)).
    expect(studentTTwoSidedQuantile(0.95, 1)).toBeCloseTo(Math.tan(0.475 * Math.PI), 10);
    expect(studentTTwoSidedQuantile(0.95, 2)).toBeCloseTo(0.95 * Math.sqrt(2 / (1 - 0.95 ** 2)), 12);
    expect(studentTTwoSidedQuantile(0.5, 2)).toBeCloseTo(0.5 * Math.sqrt(2 / (1 - 0.25)), 12);
  });

  it("matches four-decimal t tables (standard tables, from memory)", () => {
    expect(studentTTwoSidedQuantile(0.95, 5)).toBeCloseTo(2.5706, 4);
    expect(studentTTwoSidedQuantile(0.95, 10)).toBeCloseTo(2.2281, 4);
    expect(studentTTwoSidedQuantile(0.95, 30)).toBeCloseTo(2.0423, 4);
    expect(studentTTwoSidedQuantile(0.99, 10)).toBeCloseTo(3.1693, 4);
  });

  it("joins the exact series and the Cornish–Fisher expansion smoothly at df = 1000", () => {
    const exact = studentTTwoSidedQuantile(0.95, 1000);
    const expansion = studentTTwoSidedQuantile(0.95, 1001);
    expect(expansion).toBeLessThan(exact);
    // dt/dν ≈ −(z³ + z)/(4ν²) ≈ −2.4e−6 at ν = 1000 (from the expansion's first term).
    expect(exact - expansion).toBeGreaterThan(1.5e-6);
    expect(exact - expansion).toBeLessThan(3.5e-6);
  });

  it("tends to the normal 97.5% point 1.959963984540054 (from memory)", () => {
    // At df = 2^53 − 1 the t correction (z³ + z)/(4·df) is below 1e−15.
    expect(studentTTwoSidedQuantile(0.95, Number.MAX_SAFE_INTEGER)).toBeCloseTo(1.959963984540054, 12);
  });

  it("uses a series that is a probability: 0 at θ = 0 and 1 at θ = π/2", () => {
    for (const df of [1, 2, 3, 8, 51]) {
      expect(studentTCentralProbability(0, df)).toBe(0);
      expect(studentTCentralProbability(Math.PI / 2, df)).toBeCloseTo(1, 12);
    }
  });
});

describe("hiddenSourceBounds: deep passes", () => {
  it("walks thousands of levels without exhausting the call stack (iterative depth-first walk)", () => {
    const res = hiddenSourceBounds(rotationP, rotationB, uniform3, { maxN: 20000, workBudget: 5e7 });
    expect(res.n).toBe(20000);
    expect(res.bounds[res.n - 1]).toEqual({ n: 20000, lower: 0, upper: 0 });
  });
});

describe("hiddenSourceBounds: resumed passes", () => {
  it("gives bit-identical figures whether reached in one pass or in several resumed ones", () => {
    // A fictional ring-oscillator sampler: "rest" reads 0, "edge" reads 0 or 2, "pulse" reads 1
    // and is always followed by rest, so the strings 11 and 12 never occur and are pruned.
    const P: DenseMatrix = { n: 3, data: new Float64Array([0.5, 0.3, 0.2, 0.6, 0.1, 0.3, 1, 0, 0]) };
    const B: EmissionMatrix = { states: 3, symbols: 3, data: new Float64Array([1, 0, 0, 0.5, 0, 0.5, 0, 1, 0]) };
    const mu = stationary3(P);
    const onePass = hiddenSourceBounds(P, B, mu, { maxN: 14, workBudget: 1e9 });
    expect(onePass.n).toBe(14);
    // With 1e6, a single pass budgeted for 3^t strings per level could only reach n = 10
    // (27·(3^10 − 1)/2 ≤ 1e6 < 27·(3^11 − 1)/2); the counts it finds let later passes go further.
    const resumed = hiddenSourceBounds(P, B, mu, { maxN: 14, workBudget: 1e6 });
    expect(resumed.n).toBeGreaterThan(10);
    expect(resumed.work).toBeLessThanOrEqual(1e6);
    expect(resumed.bounds).toEqual(onePass.bounds.slice(0, resumed.n));
    expect(resumed.blockEntropyBits).toEqual(onePass.blockEntropyBits.slice(0, resumed.n));

    // With 2.5e7 the first pass stops at n = 13, whose 2^16+ strings are too many to keep, so the
    // pass to n = 14 restarts from the root: the work is exactly both single passes together.
    const to13 = hiddenSourceBounds(P, B, mu, { maxN: 13, workBudget: 1e9 });
    const restarted = hiddenSourceBounds(P, B, mu, { maxN: 14, workBudget: 2.5e7 });
    expect(restarted.n).toBe(14);
    expect(restarted.work).toBe(to13.work + onePass.work);
    expect(restarted.bounds).toEqual(onePass.bounds);
  });
});
