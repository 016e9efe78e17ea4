// Rényi entropy rates of slowly mixing chains, where plain power iteration crawls: the Perron root
// of [Pᵢⱼ^α] is checked against ml-matrix's general eigenvalue decomposition (a general-purpose
// linear-algebra library), and the rate formula (1/(1−α)) ln λ(α) is Rached, Alajaji and Campbell 2001.
import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { renyiEntropyRate } from "~/engine/renyi";

function reference(rows: number[][], alpha: number): number {
  const ev = new EigenvalueDecomposition(new Matrix(rows.map((r) => r.map((v) => (v > 0 ? v ** alpha : 0)))));
  const lambda = Math.max(...ev.realEigenvalues);
  return Math.log(lambda) / (1 - alpha);
}

describe("Rényi rate on nearly decomposable chains", () => {
  // Three weakly coupled sensor regimes (coupling 1e-3 … 1e-9).
  for (const eps of [1e-3, 1e-6, 1e-9]) {
    const rows = [
      [1 - 3 * eps, 2 * eps, eps],
      [2 * eps, 1 - 3 * eps, eps],
      [eps, eps, 1 - 2 * eps],
    ];
    for (const alpha of [0.5, 2, 4, 30]) {
      it(`coupling ${eps}, α = ${alpha}`, () => {
        const got = renyiEntropyRate({ n: 3, data: Float64Array.from(rows.flat()) }, alpha).nats;
        const want = reference(rows, alpha);
        expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(want)) + 1e-12);
      });
    }
  }

  it("a 40-state ring of nearly absorbing states with a leak", () => {
    const n = 40;
    const rows = Array.from({ length: n }, (_, i) => {
      const r = new Array(n).fill(0);
      r[i] = 0.9999;
      r[(i + 1) % n] = 0.0001;
      return r;
    });
    for (const alpha of [2, 0.5]) {
      const got = renyiEntropyRate({ n, data: Float64Array.from(rows.flat()) }, alpha).nats;
      // Circulant matrix: its Perron root is the row sum Σ Pᵢⱼ^α (derivable: the all-ones vector is an eigenvector).
      const want = Math.log(0.9999 ** alpha + 0.0001 ** alpha) / (1 - alpha);
      expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-11);
    }
  });
});
