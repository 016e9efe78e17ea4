import { describe, expect, it } from "vitest";
import { EigenvalueDecomposition, Matrix, solve } from "ml-matrix";
import type { DenseMatrix } from "~/engine/types";
import { binaryEntropyBits } from "~/engine/numeric";
import { denseToSparse, sparseToDense } from "~/engine/sparse";
import { classify } from "~/engine/classify";
import { stationaryGTH, stationaryIterative } from "~/engine/stationary";
import { entropyRateGeneral, entropyRateTwoState, graphWalkClosedForm, graphWalkMatrix, type WeightedEdges } from "~/engine/entropy-rate";
import { minEntropyRateHoward, minEntropyRateKarp } from "~/engine/min-entropy";
import { perronRoot, renyiEntropyRate } from "~/engine/renyi";

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
function randomChain(n: number, rnd: () => number, density = 0.5): DenseMatrix {
  const data = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < n; j++) if (rnd() < density) s += data[i * n + j] = rnd();
    data[i * n + ((i + 1) % n)] += 0.05;
    s += 0.05;
    for (let j = 0; j < n; j++) data[i * n + j] /= s;
  }
  return { n, data };
}
const edgesOf = (list: [number, number, number][]): WeightedEdges => ({
  u: Int32Array.from(list.map((e) => e[0])),
  v: Int32Array.from(list.map((e) => e[1])),
  w: Float64Array.from(list.map((e) => e[2])),
});

describe("binary entropy", () => {
  it("h(1/4) and h(0.1)", () => {
    // Source: the definition h(p) = −p log₂ p − (1−p) log₂(1−p) (Shannon 1948).
    expect(binaryEntropyBits(0.25)).toBeCloseTo(0.8112781244591328, 15);
    expect(binaryEntropyBits(0.1)).toBeCloseTo(0.4689955935892812, 15);
  });
});

describe("two-state closed form vs the general formula", () => {
  it("agrees on 500 random (a, b)", () => {
    // Source: derivable from −Σ μᵢ Pᵢⱼ log Pᵢⱼ with μ = (b, a)/(a + b).
    const rnd = mulberry32(77);
    for (let t = 0; t < 500; t++) {
      const a = t % 50 === 0 ? 1 : rnd();
      const b = t % 70 === 0 ? 1e-9 : rnd();
      const cf = entropyRateTwoState(a, b);
      const P = { n: 2, data: Float64Array.from([1 - a, a, b, 1 - b]) };
      const mu = stationaryGTH(P);
      const g = entropyRateGeneral(P, mu).bits;
      expect(Math.abs(cf.rate.bits - g)).toBeLessThanOrEqual(1e-14 * (1 + g));
      expect(Math.abs(cf.stationary[0] - mu[0])).toBeLessThan(1e-14);
    }
  });
});

describe("random walks on graphs", () => {
  it("a d-regular circulant graph gives log₂ d", () => {
    // Source: standard result (Levin, Peres and Wilmer, ch. 1–2); derivable: uniform μ, uniform rows.
    for (const [m, d] of [[11, 2], [20, 4], [31, 6]]) {
      const list: [number, number, number][] = [];
      for (let i = 0; i < m; i++) for (let s = 1; s <= d / 2; s++) list.push([i, (i + s) % m, 3.5]);
      const E = edgesOf(list);
      expect(graphWalkClosedForm(m, E).rate.bits).toBeCloseTo(Math.log2(d), 13);
      const P = graphWalkMatrix(m, E);
      expect(entropyRateGeneral(P, stationaryGTH(sparseToDense(P))).bits).toBeCloseTo(Math.log2(d), 13);
    }
  });
  it("the complete graph Kₘ gives log₂(m − 1)", () => {
    // Source: standard result (Levin, Peres and Wilmer, ch. 1–2); derivable as above.
    for (const m of [3, 5, 12]) {
      const list: [number, number, number][] = [];
      for (let i = 0; i < m; i++) for (let j = i + 1; j < m; j++) list.push([i, j, 1]);
      expect(graphWalkClosedForm(m, edgesOf(list)).rate.bits).toBeCloseTo(Math.log2(m - 1), 13);
    }
  });
  it("period 2 iff bipartite", () => {
    // Source: standard result (Levin, Peres and Wilmer, ch. 1–2): a connected graph's walk has period 2 iff it is bipartite.
    const period = (m: number, list: [number, number, number][]) => classify(graphWalkMatrix(m, edgesOf(list))).periods[0];
    const cycle = (m: number): [number, number, number][] => Array.from({ length: m }, (_, i) => [i, (i + 1) % m, 1]);
    expect(period(8, cycle(8))).toBe(2);
    expect(period(9, cycle(9))).toBe(1);
    const k34: [number, number, number][] = [];
    for (let i = 0; i < 3; i++) for (let j = 3; j < 7; j++) k34.push([i, j, 1 + i + j]);
    expect(period(7, k34)).toBe(2);
    expect(period(7, [...k34, [0, 1, 1]])).toBe(1); // an edge inside one side makes an odd cycle
    expect(period(7, [...k34, [4, 4, 1]])).toBe(1); // a self-loop too
  });
});

describe("stationary distributions and Perron roots against ml-matrix", () => {
  it("GTH matches a linear solve of μ(P − I) = 0, Σμ = 1", () => {
    // Source: ml-matrix (general-purpose linear algebra), LU solve.
    const rnd = mulberry32(5);
    for (const n of [3, 8, 25, 60]) {
      const P = randomChain(n, rnd);
      const A = new Matrix(n, n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) A.set(j, i, P.data[i * n + j] - (i === j ? 1 : 0));
      for (let j = 0; j < n; j++) A.set(n - 1, j, 1);
      const rhs = Matrix.columnVector(Array.from({ length: n }, (_, i) => (i === n - 1 ? 1 : 0)));
      const x = solve(A, rhs).getColumn(0);
      const mu = stationaryGTH(P);
      for (let i = 0; i < n; i++) expect(Math.abs(mu[i] - x[i]) / x[i]).toBeLessThan(1e-10);
    }
  });
  it("perronRoot matches the largest real eigenvalue of random nonnegative matrices", () => {
    // Source: ml-matrix EigenvalueDecomposition (general-purpose).
    const rnd = mulberry32(9);
    for (const n of [2, 5, 14, 40]) {
      const data = new Float64Array(n * n);
      for (let k = 0; k < n * n; k++) data[k] = rnd() < 0.5 ? 3 * rnd() : 0;
      for (let i = 0; i < n; i++) data[i * n + ((i + 1) % n)] += 0.1;
      const rows = Array.from({ length: n }, (_, i) => Array.from(data.slice(i * n, i * n + n)));
      const e = new EigenvalueDecomposition(new Matrix(rows));
      const lambda = Math.max(...e.realEigenvalues);
      const r = perronRoot({ n, data });
      expect(Math.abs(Math.exp(r.logRoot) - lambda) / lambda).toBeLessThan(1e-11);
      // the vector is a right eigenvector
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let j = 0; j < n; j++) s += data[i * n + j] * r.vector[j];
        expect(Math.abs(s - lambda * r.vector[i])).toBeLessThan(1e-9 * lambda * Math.max(...r.vector));
      }
    }
  });
  it("perronRoot handles a periodic matrix (a weighted 5-cycle: root = geometric mean of the weights)", () => {
    // Source: derivable: A⁵ = (Π wᵢ)·I on a cycle, so λ = (Π wᵢ)^{1/5}.
    const w = [2, 0.5, 3, 1.5, 0.25];
    const data = new Float64Array(25);
    for (let i = 0; i < 5; i++) data[i * 5 + ((i + 1) % 5)] = w[i];
    const expected = w.reduce((s, x) => s + Math.log(x), 0) / 5;
    expect(Math.abs(perronRoot({ n: 5, data }).logRoot - expected)).toBeLessThan(1e-13);
  });
});

describe("GTH on a nearly decomposable chain", () => {
  it("keeps full relative accuracy with 1e-12 coupling", () => {
    // Source: derivable: a birth–death chain is reversible, so μ_{i+1}/μ_i = P(i→i+1)/P(i+1→i)
    // (detailed balance). Two blocks {0,1,2} and {3,4,5} coupled only by 2 ⇄ 3 with 1e-12 and 4e-12.
    const up = [0.3, 0.6, 1e-12, 0.2, 0.5];
    const down = [0.4, 0.1, 4e-12, 0.3, 0.4]; // down[i] = P(i+1 → i)
    const n = 6;
    const data = new Float64Array(n * n);
    for (let i = 0; i < n - 1; i++) {
      data[i * n + i + 1] = up[i];
      data[(i + 1) * n + i] = down[i];
    }
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) if (j !== i) s += data[i * n + j];
      data[i * n + i] = 1 - s;
    }
    const ratio = [1];
    for (let i = 0; i < n - 1; i++) ratio.push((ratio[i] * up[i]) / down[i]);
    const total = ratio.reduce((a, b) => a + b, 0);
    const exact = ratio.map((r) => r / total);
    for (const order of ["forward", "reverse"] as const) {
      const mu = stationaryGTH({ n, data }, { order });
      for (let i = 0; i < n; i++) expect(Math.abs(mu[i] - exact[i]) / exact[i]).toBeLessThan(1e-14);
    }
  });
});

describe("Rényi limits", () => {
  it("tends to the min-entropy rate as α grows (α = 50, 200)", () => {
    // Source: Rached, Alajaji and Campbell 2001 (rate formula); bound derivable: log λ(α) = α·c + t with
    // c the max mean cycle of ln P and 0 ≤ t ≤ ln n, so |R_α − Hmin| ≤ (|c| + ln n)/(α − 1) nats.
    const rnd = mulberry32(21);
    for (const n of [4, 15]) {
      const P = randomChain(n, rnd);
      const hmin = minEntropyRateKarp(P).nats;
      const d50 = Math.abs(renyiEntropyRate(P, 50).nats - hmin);
      const d200 = Math.abs(renyiEntropyRate(P, 200).nats - hmin);
      expect(d50).toBeLessThanOrEqual((hmin + Math.log(n)) / 49 + 1e-12);
      expect(d200).toBeLessThanOrEqual((hmin + Math.log(n)) / 199 + 1e-12);
      expect(d200).toBeLessThan(d50);
    }
  });
  it("tends to the Shannon rate as α → 1 (α = 1 ± 1e-4) and brackets it", () => {
    // Source: Rached, Alajaji and Campbell 2001 (α → 1 gives the Shannon rate); Rényi rates are non-increasing in α.
    const rnd = mulberry32(22);
    for (const n of [3, 10]) {
      const P = randomChain(n, rnd);
      const h = entropyRateGeneral(P, stationaryGTH(P)).bits;
      const lo = renyiEntropyRate(P, 1 + 1e-4).bits;
      const hi = renyiEntropyRate(P, 1 - 1e-4).bits;
      expect(lo).toBeLessThanOrEqual(h + 1e-8);
      expect(hi).toBeGreaterThanOrEqual(h - 1e-8);
      expect(Math.abs(lo - h)).toBeLessThan(1e-3 * h);
      expect(Math.abs(hi - h)).toBeLessThan(1e-3 * h);
    }
  });
});

describe("the no-11 constraint", () => {
  it("Parry measure on [[1,1],[1,0]] has rate log₂ φ = 0.6942419136306174", () => {
    // Source: Lind and Marcus (1995); Parry 1964: Pᵢⱼ = Aᵢⱼ vⱼ/(λ vᵢ) with A v = λ v, λ = φ.
    const A = { n: 2, data: Float64Array.from([1, 1, 1, 0]) };
    const r = perronRoot(A);
    expect(r.logRoot / Math.LN2).toBeCloseTo(0.6942419136306174, 14);
    const lambda = Math.exp(r.logRoot);
    const v = r.vector;
    const P = { n: 2, data: new Float64Array(4) };
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) P.data[i * 2 + j] = (A.data[i * 2 + j] * v[j]) / (lambda * v[i]);
    expect(entropyRateGeneral(P, stationaryGTH(P)).bits).toBeCloseTo(0.6942419136306174, 14);
    // α → 0 gives the topological entropy (Rached, Alajaji and Campbell 2001)
    expect(renyiEntropyRate(P, 1e-6).bits).toBeCloseTo(0.6942419136306174, 5);
  });
});

describe("two routes agree", () => {
  it("Karp vs Howard on random dense and sparse chains", () => {
    // Source: two independent algorithms for the same maximum cycle mean (Karp 1978; Cochet-Terrasson et al. 1998).
    const rnd = mulberry32(31);
    for (const [n, density] of [[5, 0.8], [30, 0.5], [80, 0.05], [150, 0.02]] as const) {
      const P = randomChain(n, rnd, density);
      const k = minEntropyRateKarp(denseToSparse(P)).bits;
      const h = minEntropyRateHoward(P);
      expect(Math.abs(k - h.rate.bits)).toBeLessThan(1e-12 * (1 + k));
      // the returned cycle is a cycle of P with that mean
      let s = 0;
      for (let t = 0; t < h.cycle.length; t++) s -= Math.log2(P.data[h.cycle[t] * n + h.cycle[(t + 1) % h.cycle.length]]);
      expect(s / h.cycle.length).toBeCloseTo(h.rate.bits, 12);
    }
  });
  it("iterative solver vs GTH on random chains", () => {
    // Source: two independent solvers of μP = μ (GTH 1985 and Gauss–Seidel).
    const rnd = mulberry32(41);
    for (const [n, density] of [[10, 0.5], [120, 0.1], [400, 0.03]] as const) {
      const P = randomChain(n, rnd, density);
      const a = stationaryGTH(P);
      const b = stationaryIterative(denseToSparse(P), { tolerance: 1e-14 });
      expect(b.converged).toBe(true);
      for (let i = 0; i < n; i++) expect(Math.abs(a[i] - b.mu[i]) / a[i]).toBeLessThan(1e-10);
    }
  });
});
