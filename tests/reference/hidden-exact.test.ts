import { describe, expect, it } from "vitest";
import { Matrix, solve } from "ml-matrix";
import { hiddenSourceBounds, type EmissionMatrix } from "../../app/engine/hidden";
import { createRng } from "../../app/engine/rng";
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

/** −Σ p log₂ p with 0 log 0 = 0, written out here rather than taken from the engine. */
function entropyOf(ps: Iterable<number>): number {
  let h = 0;
  for (const p of ps) if (p > 0) h -= p * Math.log2(p);
  return h;
}

/**
 * Brute force: P(Yⁿ = y) and P(Yⁿ = y | X_1 = i) by summing over every hidden path, straight from
 * the definition of a hidden Markov source (no recursion shared with the engine).
 */
function bruteForce(P: DenseMatrix, B: EmissionMatrix, mu: Float64Array, n: number): { block: number; blockGivenX1: number } {
  const s = P.n;
  const k = B.symbols;
  const joint = new Map<string, number>();
  const givenX1 = Array.from({ length: s }, () => new Map<string, number>());
  const xs = new Array<number>(n).fill(0);
  const ys = new Array<number>(n).fill(0);
  const totalX = s ** n;
  const totalY = k ** n;
  for (let xi = 0; xi < totalX; xi++) {
    let r = xi;
    for (let t = 0; t < n; t++) {
      xs[t] = r % s;
      r = Math.floor(r / s);
    }
    let px = 1;
    for (let t = 1; t < n; t++) px *= P.data[xs[t - 1] * s + xs[t]];
    if (px === 0) continue;
    for (let yi = 0; yi < totalY; yi++) {
      let q = yi;
      for (let t = 0; t < n; t++) {
        ys[t] = q % k;
        q = Math.floor(q / k);
      }
      let pe = px;
      for (let t = 0; t < n; t++) pe *= B.data[xs[t] * k + ys[t]];
      if (pe === 0) continue;
      const key = ys.join("");
      joint.set(key, (joint.get(key) ?? 0) + mu[xs[0]] * pe);
      givenX1[xs[0]].set(key, (givenX1[xs[0]].get(key) ?? 0) + pe);
    }
  }
  let blockGivenX1 = 0;
  for (let i = 0; i < s; i++) blockGivenX1 += mu[i] * entropyOf(givenX1[i].values());
  return { block: entropyOf(joint.values()), blockGivenX1 };
}

describe("hidden source whose output is itself a Markov chain (lumpable emission)", () => {
  // A fictional warehouse robot moves between four floor zones; a ceiling beacon only tells
  // "aisle" (zones 0, 1) from "dock" (zones 2, 3). P is lumpable for {0,1},{2,3}: every row puts
  // the same mass into each block as the other rows of its block (Kemeny and Snell, lumpability).
  const P: DenseMatrix = {
    n: 4,
    data: new Float64Array([
      0.5, 0.3, 0.15, 0.05,
      0.1, 0.7, 0.0, 0.2,
      0.25, 0.15, 0.4, 0.2,
      0.05, 0.35, 0.3, 0.3,
    ]),
  };
  const B: EmissionMatrix = { states: 4, symbols: 2, data: new Float64Array([1, 0, 1, 0, 0, 1, 0, 1]) };
  const mu = stationaryByMlMatrix(P);

  it("brackets the output chain's rate Σ ν_a h(Q_a) for every n and closes in on it", () => {
    // Rate of the lumped chain Q, computed from its definition with plain loops (Shannon 1948):
    // Q[a][b] = Σ_{j in block b} P[i][j] for any i in block a.
    const block = [0, 0, 1, 1];
    const Q = [
      [0, 0],
      [0, 0],
    ];
    for (const i of [0, 2]) for (let j = 0; j < 4; j++) Q[block[i]][block[j]] += P.data[i * 4 + j];
    // Two-state stationary vector ν = (q10, q01)/(q01 + q10) (derivable from the definition).
    const nu = [Q[1][0] / (Q[0][1] + Q[1][0]), Q[0][1] / (Q[0][1] + Q[1][0])];
    let rate = 0;
    for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) if (Q[a][b] > 0) rate -= nu[a] * Q[a][b] * Math.log2(Q[a][b]);

    const res = hiddenSourceBounds(P, B, mu, { maxN: 16 });
    expect(res.n).toBe(16);
    for (const { lower, upper } of res.bounds) {
      expect(lower).toBeLessThanOrEqual(rate + 1e-12);
      expect(upper).toBeGreaterThanOrEqual(rate - 1e-12);
    }
    // For a Markov output, H(Y_n | Y^{n−1}) is exact from n = 2 on; the lower bound meets it too,
    // because given the block of X_{n−1} the next block no longer depends on X_1.
    const last = res.bounds[res.n - 1];
    expect(Math.abs(last.upper - rate)).toBeLessThan(1e-12);
    expect(Math.abs(last.lower - rate)).toBeLessThan(1e-12);
    // At n = 1 the gap is the whole marginal entropy: the beacon is a function of X_1.
    expect(res.bounds[0].lower).toBe(0);
    expect(Math.abs(res.bounds[0].upper - entropyOf(nu))).toBeLessThan(1e-12);
  });
});

describe("brute-force block entropies", () => {
  it("H(Yⁿ) and H(Yⁿ | X_1) agree with enumeration of all hidden and output paths for n ≤ 6", () => {
    const rng = createRng(77);
    for (let trial = 0; trial < 4; trial++) {
      const s = 2 + (trial % 2);
      const k = 2 + Math.floor(trial / 2);
      const P: DenseMatrix = { n: s, data: new Float64Array(s * s) };
      const B: EmissionMatrix = { states: s, symbols: k, data: new Float64Array(s * k) };
      for (let i = 0; i < s; i++) {
        let t = 0;
        for (let j = 0; j < s; j++) t += P.data[i * s + j] = 0.05 + rng.next();
        for (let j = 0; j < s; j++) P.data[i * s + j] /= t;
        let u = 0;
        for (let y = 0; y < k; y++) u += B.data[i * k + y] = trial === 3 && y === 0 && i === 0 ? 0 : rng.next();
        for (let y = 0; y < k; y++) B.data[i * k + y] /= u;
      }
      const mu = stationaryByMlMatrix(P);
      const res = hiddenSourceBounds(P, B, mu, { maxN: 6 });
      expect(res.n).toBe(6);
      let prevGivenX1 = 0;
      let sumUpper = 0;
      for (let n = 1; n <= 6; n++) {
        const bf = bruteForce(P, B, mu, n);
        // H(Yⁿ) directly and as the chain-rule sum of the upper bounds (derivable from the definition).
        expect(Math.abs(res.blockEntropyBits[n - 1] - bf.block)).toBeLessThan(1e-12);
        sumUpper += res.bounds[n - 1].upper;
        expect(Math.abs(sumUpper - bf.block)).toBeLessThan(1e-11);
        // lower_n = H(Yⁿ | X_1) − H(Yⁿ⁻¹ | X_1) (chain rule, derivable from the definition).
        expect(Math.abs(res.bounds[n - 1].lower - (bf.blockGivenX1 - prevGivenX1))).toBeLessThan(1e-11);
        prevGivenX1 = bf.blockGivenX1;
      }
    }
  });
});

describe("i.i.d. hidden chain (all rows of P equal)", () => {
  it("gives the entropy of the output marginal as both bounds for n ≥ 2, and as the upper bound at n = 1", () => {
    // A fictional buoy's battery state, redrawn independently each report, leaks into a 3-level status code.
    const pi = [0.5, 0.3, 0.2];
    const P: DenseMatrix = { n: 3, data: new Float64Array([...pi, ...pi, ...pi]) };
    const B: EmissionMatrix = { states: 3, symbols: 3, data: new Float64Array([0.8, 0.2, 0, 0.1, 0.6, 0.3, 0, 0.25, 0.75]) };
    const q = [0, 1, 2].map((y) => pi.reduce((acc, p, i) => acc + p * B.data[i * 3 + y], 0));
    const hq = entropyOf(q); // the output is i.i.d. with marginal q (derivable from the definition)
    const hYgivenX = pi.reduce((acc, p, i) => acc + p * entropyOf(B.data.slice(i * 3, i * 3 + 3)), 0);
    const res = hiddenSourceBounds(P, B, Float64Array.from(pi), { maxN: 10 });
    expect(res.n).toBe(10);
    for (const { n, lower, upper } of res.bounds) {
      expect(Math.abs(upper - hq)).toBeLessThan(1e-12);
      // Given X_1, Y_1 is informative only about itself: lower_1 = H(Y_1 | X_1), lower_n = H(q) after.
      expect(Math.abs(lower - (n === 1 ? hYgivenX : hq))).toBeLessThan(1e-12);
    }
  });
});
