import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { diffEditions, diffFigures, diffParams, paramCells } from "~/components/model/diff";
import { computeFigures } from "~/engine/compute";
import type { ModelParams } from "~/engine/schema";

function catalogParams(slug: string): ModelParams[] {
  const file = JSON.parse(readFileSync(new URL(`../../catalog/${slug}.json`, import.meta.url), "utf8")) as { editions: { params: ModelParams }[] };
  return file.editions.map((e) => e.params);
}

describe("paramCells", () => {
  it("labels order-2 rows by context, oldest symbol first", () => {
    const [p] = catalogParams("harbour-light-code-order2");
    const cells = paramCells(p);
    expect(cells).toHaveLength(16 * 4);
    // Row 1 of the order-2 matrix over [short, long, dark, pause] is (short, long).
    expect(cells[4]).toMatchObject({ table: "P", row: "short·long", col: "short" });
    expect(cells[cells.length - 1]).toMatchObject({ row: "pause·pause", col: "pause" });
  });

  it("names a two-state chain's a and b by the transitions they stand for", () => {
    const cells = paramCells({ family: "two-state", alphabet: ["good", "bad"], a: 0.01, b: 0.3 });
    expect(cells.map((c) => c.row)).toEqual(["a = P(good → bad)", "b = P(bad → good)"]);
  });
});

describe("diffParams", () => {
  it("finds both changed parameters of the Buoy K07 uplink between editions 1 and 3", () => {
    const [e1, , e3] = catalogParams("buoy-k07-uplink-burst");
    const d = diffParams(e1, e3);
    expect(d.sameStructure).toBe(true);
    expect(d.unchanged).toBe(0);
    expect(d.changes.map((c) => [c.key, c.from, c.to])).toEqual([
      ["a", 0.0094, 0.0084],
      ["b", 0.262, 0.274],
    ]);
    expect(d.changes[1].delta).toBeCloseTo(0.012, 15);
  });

  it("reports no change for identical parameters", () => {
    const [e1] = catalogParams("ro-bits-order3");
    const d = diffParams(e1, structuredClone(e1));
    expect(d.changes).toEqual([]);
    expect(d.unchanged).toBe(paramCells(e1).length);
  });

  it("matches graph edges whatever their orientation, and sees added and removed edges", () => {
    const from: ModelParams = { family: "graph-walk", nodes: ["dock", "aisle", "gate"], edges: [["dock", "aisle", 2], ["aisle", "gate", 1]] };
    const to: ModelParams = { family: "graph-walk", nodes: ["dock", "aisle", "gate"], edges: [["aisle", "dock", 2], ["dock", "gate", 5]] };
    const d = diffParams(from, to);
    expect(d.unchanged).toBe(1);
    expect(d.changes.map((c) => [c.kind, c.row])).toEqual([
      ["added", "dock – gate"],
      ["removed", "aisle – gate"],
    ]);
  });

  it("says in words when the structure itself changed", () => {
    const from: ModelParams = { family: "iid", alphabet: ["calm", "swell"], p: [0.5, 0.5] };
    const to: ModelParams = { family: "iid", alphabet: ["calm", "swell", "storm"], p: [0.5, 0.3, 0.2] };
    const d = diffParams(from, to);
    expect(d.sameStructure).toBe(false);
    expect(d.structure).toEqual(["the alphabet changed: added storm"]);
    expect(d.changes.find((c) => c.key === "p|storm")).toMatchObject({ kind: "added", to: 0.2 });
    expect(d.changes.find((c) => c.key === "p|swell")).toMatchObject({ kind: "changed", from: 0.5, to: 0.3 });
  });
});

describe("diffFigures", () => {
  it("gives the change of every figure between two editions, in bits", () => {
    const [e1, , e3] = catalogParams("buoy-k07-uplink-burst");
    const f1 = computeFigures({ model: e1 });
    const f3 = computeFigures({ model: e3 });
    const d = diffFigures(f1, f3);
    const rate = d.find((x) => x.key === "entropyRate")!;
    expect(rate.from).toBe(f1.entropyRate!.bits);
    expect(rate.to).toBe(f3.entropyRate!.bits);
    expect(rate.delta).toBeCloseTo(f3.entropyRate!.bits - f1.entropyRate!.bits, 15);
    expect(rate.changed).toBe(true);
    expect(d.map((x) => x.key)).toEqual(["entropyRate", "minEntropyRate", "renyi:0.5", "renyi:2", "renyi:4", "stationary:good", "stationary:bad"]);
    expect(d.every((x) => x.changed)).toBe(true);
  });

  it("treats a figure missing on one side as changed and a recomputed equal one as unchanged", () => {
    const model: ModelParams = { family: "iid", alphabet: ["0", "1"], p: [0.25, 0.75] };
    const a = computeFigures({ model });
    const b = computeFigures({ model });
    expect(diffFigures(a, b).some((x) => x.changed)).toBe(false);
    const noMin = { ...b, minEntropyRate: null };
    expect(diffFigures(a, noMin).find((x) => x.key === "minEntropyRate")).toMatchObject({ to: null, delta: null, changed: true });
  });
});

describe("diffEditions", () => {
  it("carries the edition numbers of both sides", () => {
    const [e1, e2] = catalogParams("ro-raw-bits-bench");
    const d = diffEditions({ number: 1, params: e1, figures: computeFigures({ model: e1 }) }, { number: 2, params: e2, figures: computeFigures({ model: e2 }) });
    expect([d.from, d.to]).toEqual([1, 2]);
    expect(d.params.changes.length).toBeGreaterThan(0);
  });
});
