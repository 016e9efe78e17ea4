import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { computeFigures } from "~/engine/compute";
import { entropyRateGeneral } from "~/engine/entropy-rate";
import { stationaryGTH } from "~/engine/stationary";

// Properties that follow from the definitions (Shannon 1948; Rényi rate ordering per Rached,
// Alajaji and Campbell 2001; walk closed form per Levin, Peres and Wilmer ch. 1–2), checked on
// random models. Tolerances absorb floating-point rounding only.
const EPS = 1e-10;
const RUNS = { numRuns: 40, seed: 20261201 };

/** A random irreducible chain: integer weights 0..9, plus 1 on i → i+1 so the ring keeps it connected. */
const chainArb = fc.integer({ min: 2, max: 6 }).chain((n) =>
  fc.array(fc.array(fc.integer({ min: 0, max: 9 }), { minLength: n, maxLength: n }), { minLength: n, maxLength: n }).map((w) =>
    w.map((row, i) => {
      const r = row.slice();
      r[(i + 1) % n] += 1;
      const s = r.reduce((a, b) => a + b, 0);
      return r.map((x) => x / s);
    }),
  ),
);

const labels = (n: number, prefix: string) => Array.from({ length: n }, (_, i) => `${prefix}${i}`);

function markov(P: number[][]) {
  return { family: "markov", alphabet: labels(P.length, "s"), P };
}

describe("entropy-rate properties", () => {
  it("0 ≤ H ≤ log₂|A| for Markov chains", () => {
    fc.assert(
      fc.property(chainArb, (P) => {
        const r = computeFigures({ model: markov(P) });
        expect(r.entropyRate!.bits).toBeGreaterThanOrEqual(-EPS);
        expect(r.entropyRate!.bits).toBeLessThanOrEqual(Math.log2(P.length) + EPS);
        expect(r.verification.passed).toBe(true);
      }),
      RUNS,
    );
  });

  it("0 ≤ H ≤ log₂(symbols) for hidden sources", () => {
    const arb = fc.tuple(chainArb, fc.integer({ min: 2, max: 3 }), fc.array(fc.integer({ min: 1, max: 9 }), { minLength: 18, maxLength: 18 }));
    fc.assert(
      fc.property(arb, ([P, k, w]) => {
        const B = P.map((_, i) => {
          const row = w.slice(i * 3, i * 3 + k);
          const s = row.reduce((a, b) => a + b, 0);
          return row.map((x) => x / s);
        });
        const r = computeFigures({ model: { family: "hidden", states: labels(P.length, "x"), alphabet: labels(k, "y"), P, B }, blockLengths: 6 });
        expect(r.entropyRate!.bits).toBeGreaterThanOrEqual(-EPS);
        expect(r.entropyRate!.bits).toBeLessThanOrEqual(Math.log2(k) + EPS);
        for (const b of r.bounds!) expect(b.upper).toBeLessThanOrEqual(Math.log2(k) + EPS);
      }),
      { numRuns: 15, seed: 7 },
    );
  });

  it("H(Xⁿ)/n is non-increasing and ≥ H", () => {
    fc.assert(
      fc.property(chainArb, fc.integer({ min: 1, max: 2 }), (P, order) => {
        // Reuse the random rows as an order-k chain when they fit (|A|^k rows of |A| entries).
        const model = order === 2 && P.length === 4 ? { family: "markov", alphabet: ["a", "b"], order: 2, P: P.map((r) => [r[0] + r[1], r[2] + r[3]]) } : markov(P);
        const r = computeFigures({ model, blockLengths: 10 });
        const H = r.entropyRate!.bits;
        const per = r.blockEntropies.map((b) => b.perSymbol);
        for (let i = 1; i < per.length; i++) expect(per[i]).toBeLessThanOrEqual(per[i - 1] + EPS);
        for (const x of per) expect(x).toBeGreaterThanOrEqual(H - EPS);
      }),
      RUNS,
    );
  });

  it("permuting the states leaves every figure unchanged and permutes μ", () => {
    fc.assert(
      fc.property(
        chainArb.chain((P) => fc.tuple(fc.constant(P), fc.shuffledSubarray([...P.keys()], { minLength: P.length, maxLength: P.length }))),
        ([P, perm]) => {
          const Q = perm.map((i) => perm.map((j) => P[i][j]));
          const a = computeFigures({ model: markov(P) });
          const b = computeFigures({ model: { family: "markov", alphabet: perm.map((i) => `s${i}`), P: Q } });
          expect(b.entropyRate!.bits).toBeCloseTo(a.entropyRate!.bits, 12);
          expect(b.minEntropyRate!.bits).toBeCloseTo(a.minEntropyRate!.bits, 12);
          b.renyi.forEach((x, t) => expect(x.bits).toBeCloseTo(a.renyi[t].bits, 10));
          perm.forEach((i, k) => expect(b.stationary![k]).toBeCloseTo(a.stationary![i], 13));
          expect(b.period).toBe(a.period);
        },
      ),
      RUNS,
    );
  });

  it("min-entropy ≤ Rényi(2) ≤ Shannon ≤ Rényi(0.5)", () => {
    fc.assert(
      fc.property(chainArb, (P) => {
        const r = computeFigures({ model: markov(P) });
        const at = (a: number) => r.renyi.find((x) => x.order === a)!.bits;
        expect(r.minEntropyRate!.bits).toBeLessThanOrEqual(at(2) + EPS);
        expect(at(2)).toBeLessThanOrEqual(r.entropyRate!.bits + EPS);
        expect(r.entropyRate!.bits).toBeLessThanOrEqual(at(0.5) + EPS);
      }),
      RUNS,
    );
  });
});

describe("closed forms equal the general formula", () => {
  it("two-state", () => {
    fc.assert(
      fc.property(fc.double({ min: 0.001, max: 1, noNaN: true }), fc.double({ min: 0.001, max: 1, noNaN: true }), (a, b) => {
        const r = computeFigures({ model: { family: "two-state", alphabet: ["calm", "swell"], a, b } });
        const P = { n: 2, data: new Float64Array([1 - a, a, b, 1 - b]) };
        const general = entropyRateGeneral(P, stationaryGTH(P)).bits;
        expect(r.entropyRate!.bits).toBeCloseTo(general, 12);
      }),
      RUNS,
    );
  });

  it("i.i.d.", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1, max: 50 }), { minLength: 1, maxLength: 8 }), (w) => {
        const s = w.reduce((x, y) => x + y, 0);
        const p = w.map((x) => x / s);
        const r = computeFigures({ model: { family: "iid", alphabet: labels(p.length, "b"), p } });
        const n = p.length;
        const P = { n, data: new Float64Array(n * n).map((_, k) => p[k % n]) };
        expect(r.entropyRate!.bits).toBeCloseTo(entropyRateGeneral(P, p).bits, 12);
      }),
      RUNS,
    );
  });

  it("graph walk", () => {
    const arb = fc.integer({ min: 2, max: 6 }).chain((n) =>
      fc.tuple(fc.constant(n), fc.array(fc.tuple(fc.nat(n - 1), fc.nat(n - 1), fc.integer({ min: 1, max: 9 })), { maxLength: 8 }), fc.array(fc.integer({ min: 1, max: 9 }), { minLength: n, maxLength: n })),
    );
    fc.assert(
      fc.property(arb, ([n, extra, ring]) => {
        const nodes = labels(n, "bay");
        // A ring keeps the floor graph connected; extra edges (self-loops included) are random.
        const edges = [...ring.map((w, i) => [i, (i + 1) % n, w] as const), ...extra].map(([u, v, w]) => [nodes[u], nodes[v], w]);
        const r = computeFigures({ model: { family: "graph-walk", nodes, edges } });
        // The walk matrix written out: P_ij = w_ij / W_i, a self-loop counted once.
        const W = new Float64Array(n * n);
        for (const [u, v, w] of edges) {
          const i = nodes.indexOf(u as string);
          const j = nodes.indexOf(v as string);
          W[i * n + j] += w as number;
          if (i !== j) W[j * n + i] += w as number;
        }
        const data = new Float64Array(n * n);
        for (let i = 0; i < n; i++) {
          let s = 0;
          for (let j = 0; j < n; j++) s += W[i * n + j];
          for (let j = 0; j < n; j++) data[i * n + j] = W[i * n + j] / s;
        }
        const P = { n, data };
        expect(r.entropyRate!.bits).toBeCloseTo(entropyRateGeneral(P, stationaryGTH(P)).bits, 12);
        expect(r.verification.passed).toBe(true);
      }),
      RUNS,
    );
  });
});
