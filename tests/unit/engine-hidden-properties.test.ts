import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Matrix, solve } from "ml-matrix";
import { hiddenSourceBounds, type EmissionMatrix } from "../../app/engine/hidden";
import type { DenseMatrix } from "../../app/engine/types";

/** Stationary vector from the general-purpose ml-matrix solver: μ(P − I) = 0 with Σμ = 1. */
function stationaryByMlMatrix(P: DenseMatrix): Float64Array {
  const n = P.n;
  const A = Matrix.zeros(n, n);
  const b = Matrix.zeros(n, 1);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) A.set(j, i, P.data[i * n + j] - (i === j ? 1 : 0));
  for (let j = 0; j < n; j++) A.set(n - 1, j, 1);
  b.set(n - 1, 0, 1);
  return Float64Array.from(solve(A, b).getColumn(0));
}

/** Entries that are 0 about a third of the time, otherwise in [0.01, 1]. */
const weight = fc.oneof(fc.constant(0), fc.double({ min: 0.01, max: 1, noNaN: true }), fc.double({ min: 0.01, max: 1, noNaN: true }));

/** A random small hidden source (2–4 states, 2–3 symbols) with an irreducible hidden chain. */
const smallSource = fc
  .record({ s: fc.integer({ min: 2, max: 4 }), k: fc.integer({ min: 2, max: 3 }) })
  .chain(({ s, k }) =>
    fc.record({
      s: fc.constant(s),
      k: fc.constant(k),
      p: fc.array(weight, { minLength: s * s, maxLength: s * s }),
      b: fc.array(weight, { minLength: s * k, maxLength: s * k }),
    }),
  )
  .map(({ s, k, p, b }) => {
    const P: DenseMatrix = { n: s, data: Float64Array.from(p) };
    const B: EmissionMatrix = { states: s, symbols: k, data: Float64Array.from(b) };
    for (let i = 0; i < s; i++) {
      P.data[i * s + ((i + 1) % s)] += 0.05; // the cycle i → i+1 keeps the chain irreducible
      B.data[i * k + (i % k)] += 0.05; // every state emits something
      let tp = 0;
      for (let j = 0; j < s; j++) tp += P.data[i * s + j];
      for (let j = 0; j < s; j++) P.data[i * s + j] /= tp;
      let tb = 0;
      for (let y = 0; y < k; y++) tb += B.data[i * k + y];
      for (let y = 0; y < k; y++) B.data[i * k + y] /= tb;
    }
    return { P, B, mu: stationaryByMlMatrix(P), k };
  });

// Slack for comparisons of figures that are equal in exact arithmetic.
const TOL = 1e-12;

describe("hiddenSourceBounds on random small sources", () => {
  it("sandwich: 0 ≤ lower_n ≤ upper_n ≤ log₂|symbols|, upper non-increasing, lower non-decreasing", () => {
    fc.assert(
      fc.property(smallSource, ({ P, B, mu, k }) => {
        const res = hiddenSourceBounds(P, B, mu, { maxN: 9 });
        expect(res.n).toBe(9);
        let prev = { lower: -Infinity, upper: Infinity };
        for (const b of res.bounds) {
          expect(b.lower).toBeGreaterThanOrEqual(0);
          expect(b.lower).toBeLessThanOrEqual(b.upper);
          expect(b.upper).toBeLessThanOrEqual(Math.log2(k) + TOL);
          // Monotone in n (Birch 1962).
          expect(b.upper).toBeLessThanOrEqual(prev.upper + TOL);
          expect(b.lower).toBeGreaterThanOrEqual(prev.lower - TOL);
          prev = b;
        }
        // Every lower bound lies below every upper bound, since both bracket the same rate.
        const maxLower = Math.max(...res.bounds.map((b) => b.lower));
        const minUpper = Math.min(...res.bounds.map((b) => b.upper));
        expect(maxLower).toBeLessThanOrEqual(minUpper + TOL);
      }),
      { numRuns: 60, seed: 1618 },
    );
  });

  it("H(Yⁿ)/n is non-increasing and stays above upper_n and the best lower bound", () => {
    fc.assert(
      fc.property(smallSource, ({ P, B, mu }) => {
        const res = hiddenSourceBounds(P, B, mu, { maxN: 9 });
        const perSymbol = res.blockEntropyBits.map((h, i) => h / (i + 1));
        const bestLower = res.bounds[res.n - 1].lower;
        for (let i = 0; i < perSymbol.length; i++) {
          if (i > 0) expect(perSymbol[i]).toBeLessThanOrEqual(perSymbol[i - 1] + TOL);
          // The mean of a non-increasing sequence is at least its last term (derivable from the definition).
          expect(perSymbol[i]).toBeGreaterThanOrEqual(res.bounds[i].upper - TOL);
          expect(perSymbol[i]).toBeGreaterThanOrEqual(bestLower - TOL);
        }
        // Chain rule: H(Yⁿ) = Σ_{m ≤ n} upper_m, both routes computed independently inside the pass.
        let sum = 0;
        for (let i = 0; i < res.n; i++) {
          sum += res.bounds[i].upper;
          expect(Math.abs(sum - res.blockEntropyBits[i])).toBeLessThan(1e-11);
        }
      }),
      { numRuns: 60, seed: 2718 },
    );
  });
});
