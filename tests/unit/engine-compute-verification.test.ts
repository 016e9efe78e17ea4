import { describe, expect, it } from "vitest";
import { computeFigures } from "~/engine/compute";
import { assertVerified, verifyFigures, type VerificationRecord } from "~/engine/verification";
import { VerificationError } from "~/engine/errors";

// A fictional lab's ring-oscillator source modelled as a 3-state chain, and the same lab's
// bit-pair i.i.d. model.
const chain = { family: "markov", alphabet: ["lo", "mid", "hi"], P: [[0.6, 0.3, 0.1], [0.2, 0.5, 0.3], [0.25, 0.25, 0.5]] };
const iid = { family: "iid", alphabet: ["00", "01", "10", "11"], p: [0.4, 0.3, 0.2, 0.1] };

describe("verification record", () => {
  it("passes on good input, with two routes per figure", () => {
    const r = computeFigures({ model: chain });
    const rec = r.verification;
    expect(rec.passed).toBe(true);
    const figures = rec.checks.map((c) => c.figure);
    expect(figures).toEqual(expect.arrayContaining(["entropyRate.bits", "entropyRate.nats", "minEntropyRate.bits"]));
    expect(figures.some((f) => f.startsWith("stationary["))).toBe(true);
    expect(rec.checks.filter((c) => c.figure.startsWith("renyi"))).toHaveLength(3);
    const mu = rec.checks.find((c) => c.figure.startsWith("stationary["))!;
    expect(mu.routes.map((x) => x.method)).toEqual(["GTH state reduction", "GTH state reduction, reverse elimination order"]);
    const min = rec.checks.find((c) => c.figure === "minEntropyRate.bits")!;
    expect(min.routes.map((x) => x.method)).toEqual(["Karp (published)", "Howard policy iteration"]);
    expect(() => assertVerified(rec)).not.toThrow();
  });

  it("recomputes the result when none is given, from a bare model or a request", () => {
    const a = verifyFigures(chain);
    const b = verifyFigures({ model: chain });
    expect(a.passed).toBe(true);
    expect(a).toEqual(b);
  });

  it("fails when a published figure is wrong, and assertVerified throws listing it", () => {
    const r = computeFigures({ model: chain });
    const { verification: _v, ...result } = r;
    const corrupted = { ...result, entropyRate: { bits: r.entropyRate!.bits + 1e-6, nats: r.entropyRate!.nats } };
    const corruptedClass = { ...corrupted.closedClasses[0], entropyRate: corrupted.entropyRate };
    const rec = verifyFigures(chain, { ...corrupted, closedClasses: [corruptedClass] });
    expect(rec.passed).toBe(false);
    const failed = rec.checks.filter((c) => !c.passed).map((c) => c.figure);
    expect(failed).toContain("entropyRate.bits");
    expect(() => assertVerified(rec)).toThrow(VerificationError);
    expect(() => assertVerified(rec)).toThrow(/entropyRate\.bits/);
  });

  it("catches a wrong stationary distribution", () => {
    const { verification: _v, ...result } = computeFigures({ model: chain });
    const bad = { ...result.closedClasses[0], stationary: [0.4, 0.35, 0.25] };
    const rec = verifyFigures(chain, { ...result, closedClasses: [bad] });
    expect(rec.checks.filter((c) => !c.passed).map((c) => c.figure)).toEqual(expect.arrayContaining(["solver.residual"]));
    expect(rec.passed).toBe(false);
  });

  it("throws on a record whose check was flipped to failed", () => {
    const rec: VerificationRecord = structuredClone(computeFigures({ model: iid }).verification);
    rec.checks[0] = { ...rec.checks[0], passed: false };
    expect(() => assertVerified(rec)).toThrow(VerificationError);
    // …even if the summary flag still claims success.
    expect(() => assertVerified({ ...rec, passed: true })).toThrow(VerificationError);
    expect(() => assertVerified({ engineVersion: rec.engineVersion, passed: true, checks: [] })).toThrow(VerificationError);
  });

  it("checks the i.i.d. closed forms against the general formula and Karp", () => {
    const rec = computeFigures({ model: iid }).verification;
    const H = rec.checks.find((c) => c.figure === "entropyRate.bits")!;
    expect(H.routes[0].method).toBe("closed form H(p)");
    expect(H.routes[1].method).toMatch(/general formula/);
    expect(H.difference).toBeLessThan(1e-12);
    const min = rec.checks.find((c) => c.figure === "minEntropyRate.bits")!;
    expect(min.routes[1].method).toMatch(/Karp/);
    expect(rec.passed).toBe(true);
  });

  it("uses the Rényi-limit bound for min-entropy above the Karp limit, and it brackets Howard", () => {
    const n = 600;
    const alphabet = Array.from({ length: n }, (_, i) => `bay${i}`);
    const transitions: [number, number, number][] = [];
    for (let i = 0; i < n; i++) transitions.push([i, i, 0.6], [i, (i + 1) % n, 0.4]);
    const rec = computeFigures({ model: { family: "markov", alphabet, transitions } }).verification;
    const min = rec.checks.find((c) => c.figure === "minEntropyRate.bits")!;
    expect(min.relation).toBe("within");
    expect(min.routes[1].method).toMatch(/Rényi-rate limit bound/);
    // The self-loop 0.6 is the best cycle: −log₂ 0.6 (derivable).
    expect(min.routes[0].value).toBeCloseTo(-Math.log2(0.6), 10);
    expect(min.interval![0]).toBeLessThanOrEqual(-Math.log2(0.6));
    expect(min.interval![1]).toBeGreaterThanOrEqual(-Math.log2(0.6));
    expect(rec.passed).toBe(true);
  });

  it("checks hidden sources by bounds order and Monte Carlo overlap", () => {
    const m = { family: "hidden", states: ["a", "b"], alphabet: ["0", "1"], P: [[0.8, 0.2], [0.3, 0.7]], B: [[0.9, 0.1], [0.2, 0.8]] };
    const rec = computeFigures({ model: m, blockLengths: 10 }).verification;
    expect(rec.checks.find((c) => c.figure === "bounds")!.passed).toBe(true);
    const mc = rec.checks.find((c) => c.relation === "overlap")!;
    expect(mc.routes[1].method).toMatch(/Monte Carlo/);
    expect(rec.passed).toBe(true);
  });
});
