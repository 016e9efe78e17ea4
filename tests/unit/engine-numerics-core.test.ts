import { describe, expect, it } from "vitest";
import fc from "fast-check";
import type { DenseMatrix } from "~/engine/types";
import { denseToSparse, restrictDense, sparseFromTriples, sparseToDense, transposeSparse } from "~/engine/sparse";
import { classify } from "~/engine/classify";
import { EngineNumericError, stationaryGTH, stationaryIterative, stationaryResidual } from "~/engine/stationary";
import { entropyRateGeneral, entropyRateIid, entropyRateTwoState, graphWalkClosedForm, graphWalkMatrix } from "~/engine/entropy-rate";
import { blockEntropies } from "~/engine/block-entropy";
import { minEntropyRateHoward, minEntropyRateKarp } from "~/engine/min-entropy";
import { perronRoot, renyiEntropyRate } from "~/engine/renyi";

// Seeded generator for invented test chains (mulberry32).
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
function randomChain(n: number, rnd: () => number, density = 0.6): DenseMatrix {
  const data = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < n; j++) if (rnd() < density) s += data[i * n + j] = rnd();
    data[i * n + ((i + 1) % n)] += 0.05; // the ring keeps it irreducible
    s += 0.05;
    for (let j = 0; j < n; j++) data[i * n + j] /= s;
  }
  return { n, data };
}
const dense = (rows: number[][]): DenseMatrix => ({ n: rows.length, data: Float64Array.from(rows.flat()) });

describe("sparse helpers", () => {
  it("denseToSparse drops zeros and round-trips", () => {
    const P = dense([[0, 1, 0], [0.5, 0, 0.5], [0, 0, 1]]);
    const S = denseToSparse(P);
    expect(Array.from(S.rowPtr)).toEqual([0, 1, 3, 4]);
    expect(Array.from(S.col)).toEqual([1, 0, 2, 2]);
    expect(Array.from(sparseToDense(S).data)).toEqual(Array.from(P.data));
  });
  it("sparseFromTriples sums duplicates, sorts columns, drops cancelled entries", () => {
    const S = sparseFromTriples(3, Int32Array.from([2, 0, 2, 0, 1, 1]), Int32Array.from([1, 2, 1, 0, 1, 0]), Float64Array.from([0.25, 0.5, 0.5, 0.5, 1, 0]));
    expect(Array.from(S.rowPtr)).toEqual([0, 2, 3, 4]);
    expect(Array.from(S.col)).toEqual([0, 2, 1, 1]);
    expect(Array.from(S.val)).toEqual([0.5, 0.5, 1, 0.75]);
  });
  it("sparseFromTriples rejects out-of-range indices and mismatched lengths", () => {
    expect(() => sparseFromTriples(2, Int32Array.from([0]), Int32Array.from([2]), Float64Array.from([1]))).toThrow(EngineNumericError);
    expect(() => sparseFromTriples(2, Int32Array.from([0, 1]), Int32Array.from([0]), Float64Array.from([1]))).toThrow(EngineNumericError);
  });
  it("restrictDense takes the submatrix in the given order and rejects repeats", () => {
    const P = dense([[0.1, 0.2, 0.7], [0.3, 0.3, 0.4], [0.5, 0, 0.5]]);
    expect(Array.from(restrictDense(P, [2, 0]).data)).toEqual([0.5, 0.5, 0.7, 0.1]);
    expect(() => restrictDense(P, [1, 1])).toThrow(EngineNumericError);
    expect(() => restrictDense(P, [3])).toThrow(EngineNumericError);
  });
  it("transposeSparse transposes", () => {
    const P = randomChain(7, mulberry32(3));
    const T = sparseToDense(transposeSparse(denseToSparse(P)));
    for (let i = 0; i < 7; i++) for (let j = 0; j < 7; j++) expect(T.data[i * 7 + j]).toBe(P.data[j * 7 + i]);
  });
});

describe("classify", () => {
  it("finds classes, closed classes and periods", () => {
    // 0 → {1, 2} cycle of length 2; 3 ↔ 3 self-loop closed; 0 transient, no self-loop
    const P = dense([[0, 0.5, 0, 0.5], [0, 0, 1, 0], [0, 1, 0, 0], [0, 0, 0, 1]]);
    const c = classify(P);
    expect(c.classes).toEqual([[0], [1, 2], [3]]);
    expect(c.closed).toEqual([false, true, true]);
    expect(c.closedClasses).toEqual([1, 2]);
    expect(c.periods).toEqual([0, 2, 1]);
    expect(Array.from(c.classOf)).toEqual([0, 1, 1, 2]);
    expect(c.irreducible).toBe(false);
  });
  it("handles a 200,000-state directed cycle without recursion (period = length)", () => {
    const n = 200_000;
    const rows = new Int32Array(n).map((_, i) => i);
    const cols = new Int32Array(n).map((_, i) => (i + 1) % n);
    const c = classify(sparseFromTriples(n, rows, cols, new Float64Array(n).fill(1)));
    expect(c.irreducible).toBe(true);
    expect(c.periods).toEqual([n]);
  });
  it("rejects NaN and negative entries", () => {
    expect(() => classify(dense([[NaN, 1], [1, 0]]))).toThrow(EngineNumericError);
    expect(() => classify(dense([[-0.1, 1.1], [1, 0]]))).toThrow(/entry \(0, 0\)/);
  });
});

describe("stationary distributions", () => {
  it("GTH, both elimination orders and the iterative solver agree on random chains", () => {
    const rnd = mulberry32(11);
    for (const n of [2, 3, 9, 33, 70]) {
      const P = randomChain(n, rnd);
      const a = stationaryGTH(P);
      const b = stationaryGTH(P, { order: "reverse" });
      const c = stationaryIterative(denseToSparse(P));
      expect(c.converged).toBe(true);
      expect(stationaryResidual(P, a)).toBeLessThan(1e-14);
      for (let i = 0; i < n; i++) {
        expect(Math.abs(a[i] - b[i]) / a[i]).toBeLessThan(1e-12);
        expect(Math.abs(a[i] - c.mu[i]) / a[i]).toBeLessThan(1e-9);
      }
    }
  });
  it("GTH throws EngineNumericError on a reducible chain, naming the closed classes", () => {
    const P = dense([[1, 0, 0], [0.5, 0, 0.5], [0, 0, 1]]);
    expect(() => stationaryGTH(P)).toThrow(EngineNumericError);
    expect(() => stationaryGTH(P)).toThrow(/reducible/);
    // transient state last: pivots stay positive, the zero component reveals it
    expect(() => stationaryGTH(dense([[0, 1, 0], [1, 0, 0], [0.3, 0.3, 0.4]]))).toThrow(/reducible/);
  });
  it("GTH rejects bad shapes and entries", () => {
    expect(() => stationaryGTH({ n: 2, data: new Float64Array(3) })).toThrow(EngineNumericError);
    expect(() => stationaryGTH(dense([[0.5, Infinity], [1, 0]]))).toThrow(EngineNumericError);
  });
  it("iterative solver handles a periodic ring and a slowly mixing ring with a leak", () => {
    const n = 20_000;
    const ring = sparseFromTriples(n, new Int32Array(n).map((_, i) => i), new Int32Array(n).map((_, i) => (i + 1) % n), new Float64Array(n).fill(1));
    const r = stationaryIterative(ring);
    expect(r.converged).toBe(true);
    expect(Math.abs(r.mu[123] - 1 / n)).toBeLessThan(1e-15);
    // Buoy relays pass a reading to either neighbour, with a small leak back to the harbour station 0.
    const rows: number[] = [], cols: number[] = [], vals: number[] = [];
    for (let i = 0; i < n; i++) {
      rows.push(i, i, i);
      cols.push((i + 1) % n, (i + n - 1) % n, 0);
      vals.push(0.5 * 0.999, 0.5 * 0.999, 0.001);
    }
    const leaky = sparseFromTriples(n, Int32Array.from(rows), Int32Array.from(cols), Float64Array.from(vals));
    const s = stationaryIterative(leaky, { tolerance: 1e-13 });
    expect(s.converged).toBe(true);
    expect(stationaryResidual(leaky, s.mu)).toBeLessThanOrEqual(1e-13);
    // symmetric about the harbour station (derivable: the chain commutes with the reflection i ↦ −i)
    expect(Math.abs(s.mu[5] - s.mu[n - 5]) / s.mu[5]).toBeLessThan(1e-9);
  });
  it("iterative solver reports non-convergence honestly and rejects bad options", () => {
    const P = denseToSparse(randomChain(30, mulberry32(5)));
    const r = stationaryIterative(P, { maxIterations: 0 });
    expect(r.converged).toBe(false);
    expect(r.residual).toBeGreaterThan(0);
    expect(() => stationaryIterative(P, { initial: new Float64Array(3) })).toThrow(EngineNumericError);
    expect(() => stationaryIterative(P, { tolerance: NaN })).toThrow(EngineNumericError);
    expect(() => stationaryIterative(denseToSparse(dense([[1, 0], [0.5, 0.5]])))).toThrow(/absorbing/);
  });
  it("stationaryResidual checks lengths", () => {
    expect(() => stationaryResidual(dense([[1]]), [0.5, 0.5])).toThrow(EngineNumericError);
  });
});

describe("entropy rates", () => {
  it("i.i.d. rate and its bad inputs", () => {
    expect(entropyRateIid([0.5, 0.25, 0.25]).bits).toBeCloseTo(1.5, 15); // derivable from the definition
    expect(entropyRateIid([1, 0]).bits).toBe(0);
    expect(() => entropyRateIid([0.5, 0.6])).toThrow(EngineNumericError);
    expect(() => entropyRateIid([NaN, 1])).toThrow(EngineNumericError);
    expect(() => entropyRateIid([])).toThrow(EngineNumericError);
  });
  it("two-state chain: stationary law, deterministic alternation, reducible and bad cases", () => {
    const t = entropyRateTwoState(0.2, 0.6);
    expect(t.stationary[0]).toBeCloseTo(0.75, 15);
    expect(t.rate.nats).toBeCloseTo(t.rate.bits * Math.LN2, 15);
    expect(entropyRateTwoState(1, 1).rate.bits).toBe(0);
    expect(() => entropyRateTwoState(0, 0)).toThrow(EngineNumericError);
    expect(() => entropyRateTwoState(1.2, 0.1)).toThrow(EngineNumericError);
    expect(() => entropyRateTwoState(NaN, 0.1)).toThrow(EngineNumericError);
  });
  it("general formula: a permutation chain has rate 0, μ is checked", () => {
    const P = dense([[0, 1, 0], [0, 0, 1], [1, 0, 0]]);
    expect(entropyRateGeneral(P, stationaryGTH(P)).bits).toBe(0);
    expect(() => entropyRateGeneral(P, [0.5, 0.5])).toThrow(EngineNumericError);
    expect(() => entropyRateGeneral(P, [NaN, 0.5, 0.5])).toThrow(EngineNumericError);
  });
  it("graph walk: closed form equals general formula on the walk matrix; parallel edges merge", () => {
    // A warehouse robot's floor graph: aisles with weights, a charging bay self-loop, a doubled corridor.
    const edges = { u: Int32Array.from([0, 1, 2, 3, 0, 2, 2]), v: Int32Array.from([1, 2, 3, 0, 2, 2, 3]), w: Float64Array.from([2, 1, 3, 1, 0.5, 4, 1.5]) };
    const cf = graphWalkClosedForm(4, edges);
    const P = graphWalkMatrix(4, edges);
    const g = entropyRateGeneral(P, stationaryGTH(sparseToDense(P)));
    expect(Math.abs(cf.rate.bits - g.bits)).toBeLessThan(1e-14);
    const mu = stationaryGTH(sparseToDense(P));
    for (let i = 0; i < 4; i++) expect(Math.abs(cf.stationary[i] - mu[i])).toBeLessThan(1e-15);
    expect(() => graphWalkClosedForm(5, edges)).toThrow(/node 4 has no edges/);
    expect(() => graphWalkClosedForm(4, { ...edges, w: Float64Array.from([2, 1, -3, 1, 0.5, 4, 1.5]) })).toThrow(EngineNumericError);
  });
});

describe("block entropies", () => {
  it("order 0 is n·H and conditional H", () => {
    const b = blockEntropies({ alphabetSize: 3, order: 0, contextStationary: [1], rateBits: 1.2, maxLength: 4 });
    expect(b.map((r) => r.joint)).toEqual([1.2, 2.4, 1.2 * 3, 4.8]);
    expect(b.every((r) => r.conditional === 1.2)).toBe(true);
  });
  it("order 2: marginals, monotone conditionals converging to the rate", () => {
    // An order-2 binary chain lifted to pairs; contexts (x1, x2) with index 2·x1 + x2.
    const P2 = [[0.9, 0.1], [0.4, 0.6], [0.3, 0.7], [0.2, 0.8]]; // P(next | context)
    const n = 4;
    const lifted = new Float64Array(16);
    for (let c = 0; c < 4; c++) for (let s = 0; s < 2; s++) lifted[c * 4 + ((c << 1) & 3) + s] = P2[c][s];
    const L = { n, data: lifted };
    const pi = stationaryGTH(L);
    const h = entropyRateGeneral(L, pi).bits;
    const b = blockEntropies({ alphabetSize: 2, order: 2, contextStationary: pi, rateBits: h, maxLength: 6 });
    const p1 = pi[2] + pi[3];
    expect(b[0].joint).toBeCloseTo(-(p1 * Math.log2(p1) + (1 - p1) * Math.log2(1 - p1)), 14); // derivable
    for (let k = 1; k < b.length; k++) {
      expect(b[k].conditional).toBeLessThanOrEqual(b[k - 1].conditional + 1e-15);
      expect(Math.abs(b[k].joint - b[k - 1].joint - b[k].conditional)).toBeLessThan(1e-13);
      expect(b[k].perSymbol).toBeGreaterThanOrEqual(h - 1e-15);
    }
    expect(b[5].conditional).toBe(h);
  });
  it("rejects bad arguments", () => {
    const ok = { alphabetSize: 2, order: 1, contextStationary: [0.5, 0.5], rateBits: 1, maxLength: 3 };
    expect(() => blockEntropies({ ...ok, contextStationary: [0.5] })).toThrow(EngineNumericError);
    expect(() => blockEntropies({ ...ok, contextStationary: [0.7, 0.5] })).toThrow(EngineNumericError);
    expect(() => blockEntropies({ ...ok, rateBits: NaN })).toThrow(EngineNumericError);
    expect(() => blockEntropies({ ...ok, maxLength: 0 })).toThrow(EngineNumericError);
    expect(() => blockEntropies({ ...ok, order: 1.5 })).toThrow(EngineNumericError);
  });
});

describe("min-entropy and Rényi rates", () => {
  it("a deterministic chain has min-entropy 0 and Rényi rate 0", () => {
    const P = dense([[0, 1, 0], [0, 0, 1], [1, 0, 0]]);
    expect(minEntropyRateKarp(P).bits).toBe(0);
    const h = minEntropyRateHoward(P);
    expect(h.rate.bits).toBe(0);
    expect(h.cycle).toEqual([0, 1, 2]);
    expect(renyiEntropyRate(P, 2).bits).toBe(0);
  });
  it("a two-state chain: min-entropy is the worse of the self-loops and the 2-cycle (derivable)", () => {
    const a = 0.3, b = 0.8;
    const P = dense([[1 - a, a], [b, 1 - b]]);
    const expected = Math.min(-Math.log2(1 - a), -Math.log2(1 - b), -0.5 * Math.log2(a * b));
    expect(minEntropyRateKarp(P).bits).toBeCloseTo(expected, 14);
    expect(minEntropyRateHoward(P).rate.bits).toBeCloseTo(expected, 14);
    expect(minEntropyRateHoward(P).cycle).toEqual([0]);
  });
  it("Rényi rejects α = 1, α ≤ 0, non-finite α and reducible chains", () => {
    const P = randomChain(4, mulberry32(2));
    for (const a of [1, 0, -2, NaN, Infinity]) expect(() => renyiEntropyRate(P, a)).toThrow(EngineNumericError);
    expect(() => renyiEntropyRate(dense([[1, 0], [0.5, 0.5]]), 2)).toThrow(/reducible/);
    expect(() => perronRoot(dense([[1, 0], [0.5, 0.5]]))).toThrow(EngineNumericError);
    expect(() => perronRoot(dense([[0, 0], [0, 0]]))).toThrow(EngineNumericError);
  });
  it("Rényi rate is non-increasing in α and lies between min-entropy and log₂ of the support", () => {
    const P = randomChain(12, mulberry32(8));
    const hmin = minEntropyRateHoward(P).rate.bits;
    const values = [0.2, 0.5, 0.9, 1.5, 3, 10].map((a) => renyiEntropyRate(P, a).bits);
    for (let k = 1; k < values.length; k++) expect(values[k]).toBeLessThanOrEqual(values[k - 1] + 1e-10);
    expect(values[values.length - 1]).toBeGreaterThanOrEqual(hmin - 1e-12);
    expect(values[0]).toBeLessThanOrEqual(Math.log2(12) + 1e-12);
  });
  it("large α does not underflow: a chain with tiny probabilities at α = 500", () => {
    const P = dense([[1e-3, 1 - 1e-3], [0.5, 0.5]]);
    const r = renyiEntropyRate(P, 500);
    expect(Number.isFinite(r.bits)).toBe(true);
    const hmin = minEntropyRateKarp(P).bits;
    expect(Math.abs(r.bits - hmin)).toBeLessThan((hmin + Math.log2(2)) / 499 + 1e-12);
  });
  it("min-entropy rejects a row with nowhere to go", () => {
    expect(() => minEntropyRateKarp(dense([[0, 0], [1, 0]]))).toThrow(/row 0/);
    expect(() => minEntropyRateHoward(dense([[0, 0], [1, 0]]))).toThrow(EngineNumericError);
  });
});

describe("properties (fast-check)", () => {
  const chainArb = fc.integer({ min: 2, max: 7 }).chain((n) =>
    fc.tuple(fc.constant(n), fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: n * n, maxLength: n * n }), fc.array(fc.integer({ min: 0, max: 1000 }), { minLength: n, maxLength: n })),
  );
  const build = (n: number, raw: number[]): DenseMatrix => {
    const data = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) s += data[i * n + j] = raw[i * n + j] < 0.3 ? 0 : raw[i * n + j];
      data[i * n + ((i + 1) % n)] += 0.01;
      s += 0.01;
      for (let j = 0; j < n; j++) data[i * n + j] /= s;
    }
    return { n, data };
  };
  it("0 ≤ H ≤ log₂ n and Hmin ≤ H", () => {
    fc.assert(
      fc.property(chainArb, ([n, raw]) => {
        const P = build(n, raw);
        const h = entropyRateGeneral(P, stationaryGTH(P)).bits;
        const m = minEntropyRateKarp(P).bits;
        return h >= 0 && h <= Math.log2(n) + 1e-12 && m <= h + 1e-12;
      }),
      { numRuns: 60 },
    );
  });
  it("permuting states permutes μ and leaves H, min-entropy and Rényi rates unchanged", () => {
    fc.assert(
      fc.property(chainArb, ([n, raw, keys]) => {
        const P = build(n, raw);
        const perm = Array.from({ length: n }, (_, i) => i).sort((a, b) => keys[a] - keys[b] || a - b);
        const Q = { n, data: new Float64Array(n * n) };
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) Q.data[i * n + j] = P.data[perm[i] * n + perm[j]];
        const mp = stationaryGTH(P);
        const mq = stationaryGTH(Q);
        for (let i = 0; i < n; i++) if (Math.abs(mq[i] - mp[perm[i]]) > 1e-13 * (1 + mp[perm[i]] * 10)) return false;
        const close = (x: number, y: number, t: number) => Math.abs(x - y) <= t * (1 + Math.abs(x));
        return (
          close(entropyRateGeneral(P, mp).bits, entropyRateGeneral(Q, mq).bits, 1e-13) &&
          close(minEntropyRateHoward(P).rate.bits, minEntropyRateHoward(Q).rate.bits, 1e-13) &&
          close(renyiEntropyRate(P, 2).bits, renyiEntropyRate(Q, 2).bits, 1e-11)
        );
      }),
      { numRuns: 40 },
    );
  });
});
