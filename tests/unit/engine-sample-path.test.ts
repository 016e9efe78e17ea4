import { describe, expect, it } from "vitest";
import type { DenseMatrix, SparseMatrix } from "../../app/engine/types";
import { createRng } from "../../app/engine/rng";
import { SamplePathError, sampleHiddenPath, sampleIidPath, sampleMarkovPath } from "../../app/engine/sample-path";

// A fictional coastal buoy reports its sea state as calm / choppy / rough / storm.
const buoy: DenseMatrix = {
  n: 4,
  data: new Float64Array([
    0.82, 0.15, 0.03, 0.0,
    0.3, 0.5, 0.17, 0.03,
    0.05, 0.35, 0.45, 0.15,
    0.0, 0.1, 0.4, 0.5,
  ]),
};

function toCsr(P: DenseMatrix): SparseMatrix {
  const rowPtr = new Int32Array(P.n + 1);
  const col: number[] = [];
  const val: number[] = [];
  for (let i = 0; i < P.n; i++) {
    for (let j = 0; j < P.n; j++) {
      const v = P.data[i * P.n + j];
      if (v !== 0) {
        col.push(j);
        val.push(v);
      }
    }
    rowPtr[i + 1] = col.length;
  }
  return { n: P.n, rowPtr, col: Int32Array.from(col), val: Float64Array.from(val) };
}

describe("sampleMarkovPath", () => {
  it("reproduces P: every empirical transition frequency within 5 binomial standard errors", () => {
    const path = sampleMarkovPath(buoy, [0.25, 0.25, 0.25, 0.25], 400000, createRng(11));
    const n = buoy.n;
    const counts = new Float64Array(n * n);
    const visits = new Float64Array(n);
    for (let t = 0; t + 1 < path.length; t++) {
      counts[path[t] * n + path[t + 1]]++;
      visits[path[t]]++;
    }
    for (let i = 0; i < n; i++) {
      expect(visits[i]).toBeGreaterThan(1000);
      for (let j = 0; j < n; j++) {
        const pij = buoy.data[i * n + j];
        const freq = counts[i * n + j] / visits[i];
        if (pij === 0) {
          expect(counts[i * n + j]).toBe(0); // an impossible transition is never drawn
        } else {
          // Given N_i visits to i, the N_ij are binomial(N_i, P_ij) by the strong Markov property,
          // so the frequency has standard error sqrt(P_ij(1 − P_ij)/N_i) (derivable from the definition).
          const se = Math.sqrt((pij * (1 - pij)) / visits[i]);
          expect(Math.abs(freq - pij)).toBeLessThan(5 * se);
        }
      }
    }
  });

  it("gives the same path from a dense matrix and its CSR form under one seed", () => {
    const a = sampleMarkovPath(buoy, [1, 0, 0, 0], 5000, createRng(99));
    const b = sampleMarkovPath(toCsr(buoy), [1, 0, 0, 0], 5000, createRng(99));
    expect(Array.from(b)).toEqual(Array.from(a));
    expect(a[0]).toBe(0);
  });

  it("is deterministic in the seed and differs across seeds", () => {
    const a = sampleMarkovPath(buoy, [0.25, 0.25, 0.25, 0.25], 200, createRng(5));
    const b = sampleMarkovPath(buoy, [0.25, 0.25, 0.25, 0.25], 200, createRng(5));
    const c = sampleMarkovPath(buoy, [0.25, 0.25, 0.25, 0.25], 200, createRng(6));
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(Array.from(a)).not.toEqual(Array.from(c));
  });

  it("never leaves a row whose mass is one step short of 1 by rounding", () => {
    // 0.7 + 0.2 + 0.1 is 0.9999999999999999 in floating point.
    const P: DenseMatrix = { n: 3, data: new Float64Array([0.7, 0.2, 0.1, 0.1, 0.2, 0.7, 0.2, 0.7, 0.1]) };
    const always = { next: () => 1 - 2 ** -53 };
    const path = sampleMarkovPath(P, [0, 0, 1], 10, always);
    for (const x of path) expect(x).toBeGreaterThanOrEqual(0);
    for (const x of path) expect(x).toBeLessThan(3);
  });

  it("rejects misuse with a SamplePathError", () => {
    const rng = createRng(1);
    expect(() => sampleMarkovPath(buoy, [1, 0, 0, 0], 0, rng)).toThrow(SamplePathError);
    expect(() => sampleMarkovPath(buoy, [1, 0, 0, 0], -3, rng)).toThrow(SamplePathError);
    expect(() => sampleMarkovPath(buoy, [1, 0, 0, 0], 2.5, rng)).toThrow(SamplePathError);
    expect(() => sampleMarkovPath(buoy, [1, 0, 0], 10, rng)).toThrow(/3 entries, expected 4/);
    expect(() => sampleMarkovPath({ n: 2, data: new Float64Array(3) }, [1, 0], 10, rng)).toThrow(/expected 2×2/);
    expect(() => sampleMarkovPath({ n: 2, data: new Float64Array([0, 0, 0.5, 0.5]) }, [1, 0], 10, rng)).toThrow(/row 0 has no probability mass/);
    expect(() => sampleMarkovPath({ n: 2, data: new Float64Array([Number.NaN, 1, 0.5, 0.5]) }, [1, 0], 10, rng)).toThrow(/entry 0 is NaN/);
    expect(() => sampleMarkovPath(buoy, [0, 0, 0, 0], 10, rng)).toThrow(/no probability mass/);
  });
});

describe("sampleIidPath", () => {
  it("matches p within 5 binomial standard errors and never draws a zero-probability symbol", () => {
    // A fictional lab's ring-oscillator bit source read four bits at a time, collapsed to 5 classes.
    const p = [0.4, 0, 0.35, 0.2, 0.05];
    const N = 200000;
    const path = sampleIidPath(p, N, createRng(2024));
    const counts = new Float64Array(p.length);
    for (const x of path) counts[x]++;
    expect(counts[1]).toBe(0);
    for (let i = 0; i < p.length; i++) {
      if (p[i] === 0) continue;
      const se = Math.sqrt((p[i] * (1 - p[i])) / N); // binomial standard error, derivable from the definition
      expect(Math.abs(counts[i] / N - p[i])).toBeLessThan(5 * se);
    }
  });

  it("rejects an empty or massless distribution and a bad length", () => {
    const rng = createRng(1);
    expect(() => sampleIidPath([], 5, rng)).toThrow(SamplePathError);
    expect(() => sampleIidPath([0, 0], 5, rng)).toThrow(/no probability mass/);
    expect(() => sampleIidPath([0.5, -0.5, 1], 5, rng)).toThrow(/entry 1 is -0.5/);
    expect(() => sampleIidPath([1], 0, rng)).toThrow(/positive integer/);
  });
});

describe("sampleHiddenPath", () => {
  // The buoy's hidden sea state shows only as a wave-height flag: low / high.
  const B = { states: 4, symbols: 2, data: new Float64Array([0.95, 0.05, 0.7, 0.3, 0.25, 0.75, 0, 1]) };

  it("draws symbols from the emission row of the current state (5 binomial standard errors)", () => {
    const { states, symbols } = sampleHiddenPath(buoy, B, [0.25, 0.25, 0.25, 0.25], 300000, createRng(8));
    const hits = new Float64Array(8);
    const visits = new Float64Array(4);
    for (let t = 0; t < states.length; t++) {
      hits[states[t] * 2 + symbols[t]]++;
      visits[states[t]]++;
    }
    expect(hits[3 * 2 + 0]).toBe(0); // the storm state never shows "low"
    for (let i = 0; i < 4; i++) {
      const b = B.data[i * 2];
      if (b === 0) continue;
      const se = Math.sqrt((b * (1 - b)) / visits[i]); // binomial standard error, derivable from the definition
      expect(Math.abs(hits[i * 2] / visits[i] - b)).toBeLessThan(5 * se);
    }
  });

  it("has the same hidden chain law as sampleMarkovPath (transition frequencies within 5 standard errors)", () => {
    const { states } = sampleHiddenPath(buoy, B, [1, 0, 0, 0], 300000, createRng(21));
    const counts = new Float64Array(16);
    const visits = new Float64Array(4);
    for (let t = 0; t + 1 < states.length; t++) {
      counts[states[t] * 4 + states[t + 1]]++;
      visits[states[t]]++;
    }
    for (let i = 0; i < 4; i++) {
      for (let j = 0; j < 4; j++) {
        const pij = buoy.data[i * 4 + j];
        if (pij === 0) expect(counts[i * 4 + j]).toBe(0);
        else expect(Math.abs(counts[i * 4 + j] / visits[i] - pij)).toBeLessThan(5 * Math.sqrt((pij * (1 - pij)) / visits[i]));
      }
    }
  });

  it("rejects shapes that do not match", () => {
    const rng = createRng(1);
    expect(() => sampleHiddenPath(buoy, { states: 3, symbols: 2, data: new Float64Array(6) }, [1, 0, 0, 0], 5, rng)).toThrow(/3 states, the hidden chain has 4/);
    expect(() => sampleHiddenPath(buoy, { states: 4, symbols: 2, data: new Float64Array(6) }, [1, 0, 0, 0], 5, rng)).toThrow(/expected 4×2/);
    expect(() => sampleHiddenPath(buoy, B, [1, 0, 0, 0], 0, rng)).toThrow(SamplePathError);
  });
});
