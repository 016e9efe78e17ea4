import { describe, expect, it } from "vitest";
import { hiddenMonteCarlo, hiddenSourceBounds, type EmissionMatrix } from "../../app/engine/hidden";
import type { DenseMatrix } from "../../app/engine/types";

// A fictional lab's ring-oscillator bit source drifts between two phases, flipping with
// probability p per sample (a binary symmetric Markov chain); the comparator that reads it
// misreads a bit with probability ε (a binary symmetric channel).
function observedFlipChain(p: number, eps: number): { P: DenseMatrix; B: EmissionMatrix; mu: Float64Array } {
  return {
    P: { n: 2, data: new Float64Array([1 - p, p, p, 1 - p]) },
    B: { states: 2, symbols: 2, data: new Float64Array([1 - eps, eps, eps, 1 - eps]) },
    mu: new Float64Array([0.5, 0.5]),
  };
}

/** h(p) written out from the definition. */
function h(p: number): number {
  return -p * Math.log2(p) - (1 - p) * Math.log2(1 - p);
}

/** First-order coefficient of H(Y) in ε (Jacquet, Seroussi and Szpankowski 2008; Ordentlich and Weissman 2004; from memory). */
function firstOrder(p: number): number {
  return 2 * (1 - 2 * p) * Math.log2((1 - p) / p);
}

describe("binary symmetric Markov chain through a binary symmetric channel", () => {
  for (const p of [0.1, 0.3]) {
    it(`p = ${p}: the closed bounds at large n agree with h(p) + c₁ε to O(ε²) for ε = 1e−3`, () => {
      const eps = 1e-3;
      const { P, B, mu } = observedFlipChain(p, eps);
      const res = hiddenSourceBounds(P, B, mu, { maxN: 20 });
      expect(res.n).toBe(20);
      const last = res.bounds[res.n - 1];
      expect(last.upper - last.lower).toBeLessThan(1e-9); // small ε: the filter forgets fast
      const mid = (last.lower + last.upper) / 2;
      // The ε¹ term is ≈ 5e−3 (p = 0.1) and ≈ 1e−3 (p = 0.3); 100·ε² = 1e−4 leaves room for the
      // O(ε²) remainder but not for a wrong first-order coefficient.
      expect(Math.abs(mid - (h(p) + firstOrder(p) * eps))).toBeLessThan(100 * eps * eps);
      expect(Math.abs(mid - h(p))).toBeGreaterThan(0.5 * firstOrder(p) * eps);
    });

    it(`p = ${p}: the slope (H(ε) − h(p))/ε, Richardson-extrapolated, tends to c₁`, () => {
      const slope = (eps: number) => {
        const { P, B, mu } = observedFlipChain(p, eps);
        const res = hiddenSourceBounds(P, B, mu, { maxN: 20 });
        const last = res.bounds[res.n - 1];
        return ((last.lower + last.upper) / 2 - h(p)) / eps;
      };
      // Richardson: 2·D(ε/2) − D(ε) = c₁ + O(ε²) if D(ε) = c₁ + c₂ε + O(ε²) (Jacquet et al. 2008 show H analytic in ε here).
      const extrapolated = 2 * slope(5e-4) - slope(1e-3);
      expect(Math.abs(extrapolated - firstOrder(p))).toBeLessThan(2e-3 * firstOrder(p) + 1e-4);
    });
  }

  it("the Monte Carlo 95% interval covers the bounds' midpoint (ε = 1e−3, p = 0.1)", () => {
    const { P, B, mu } = observedFlipChain(0.1, 1e-3);
    const res = hiddenSourceBounds(P, B, mu, { maxN: 20 });
    const last = res.bounds[res.n - 1];
    const mid = (last.lower + last.upper) / 2;
    const mc = hiddenMonteCarlo(P, B, mu, { length: 20000, runs: 24, seed: 4417 });
    expect(mc.ci95[0]).toBeLessThanOrEqual(mid);
    expect(mc.ci95[1]).toBeGreaterThanOrEqual(mid);
    // The interval is informative: a few thousandths of a bit wide, not the whole [0, 1].
    expect(mc.ci95[1] - mc.ci95[0]).toBeLessThan(0.01);
  });

  it("the Monte Carlo 95% interval covers the exact value in about 95% of 200 seeded repetitions", () => {
    // Coverage of a 95% Student-t interval: with 200 repetitions the count is binomial(200, 0.95),
    // mean 190, standard deviation ≈ 3.1 (derivable from the definition); accept 178 … 200.
    const { P, B, mu } = observedFlipChain(0.3, 0.05);
    const res = hiddenSourceBounds(P, B, mu, { maxN: 20 });
    const last = res.bounds[res.n - 1];
    expect(last.upper - last.lower).toBeLessThan(1e-6);
    const mid = (last.lower + last.upper) / 2;
    // The per-run estimate is unbiased for H(Yⁿ)/n, which exceeds the rate by Σ_k (upper_k − H)/n
    // (chain rule); check that this bias is negligible against the interval half-width (≈ 0.008).
    const bias = res.bounds.reduce((acc, b) => acc + (b.upper - mid), 0) / 2000;
    expect(bias).toBeLessThan(1e-4);
    let covered = 0;
    for (let rep = 0; rep < 200; rep++) {
      const mc = hiddenMonteCarlo(P, B, mu, { length: 2000, runs: 8, seed: 1000 + rep });
      if (mc.ci95[0] <= mid && mid <= mc.ci95[1]) covered++;
    }
    expect(covered).toBeGreaterThanOrEqual(178);
  });
});
