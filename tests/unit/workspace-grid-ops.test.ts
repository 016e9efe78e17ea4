// The pure helpers behind the workspace editors: cells, pasted blocks, row sums, normalising, state removal, CSV edges.
import { describe, expect, it } from "vitest";
import {
  contextRowLabels,
  contextSources,
  normaliseRow,
  parseBlock,
  parseCell,
  parseEdgeCsv,
  pasteBlock,
  remapMatrix,
  renormaliseKeptRows,
  rowIsOff,
  rowSum,
  sourcesAfterRemove,
} from "~/components/editors/grid-ops";

describe("cells and pasted blocks", () => {
  it("reads numbers and keeps text that is not one, so the engine can name it", () => {
    expect(parseCell(" .5 ")).toBe(0.5);
    expect(parseCell("1e-3")).toBe(0.001);
    expect(parseCell("+0.25")).toBe(0.25);
    expect(parseCell("0,3")).toBe("0,3");
    expect(parseCell("")).toBe("");
    expect(parseCell("Infinity")).toBe("Infinity");
  });

  it("splits a spreadsheet block by tabs and a CSV block by commas or semicolons", () => {
    expect(parseBlock("0.5\t0.5\r\n0.25\t0.75\r\n")).toEqual([
      [0.5, 0.5],
      [0.25, 0.75],
    ]);
    expect(parseBlock("0.1,0.9\n0.2;0.8\n\n")).toEqual([
      [0.1, 0.9],
      [0.2, 0.8],
    ]);
  });

  it("pastes from the focused cell and drops what falls outside the matrix", () => {
    const M = [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ];
    expect(pasteBlock(M, 1, 1, [[0.5, 0.5, 9], [0.25, 0.75], [7, 7]])).toEqual([
      [1, 0, 0],
      [0, 0.5, 0.5],
      [0, 0.25, 0.75],
    ]);
    expect(M[1]).toEqual([0, 1, 0]); // the input is not changed
  });
});

describe("row sums and normalising", () => {
  it("sums with compensation and marks a row off 1 or with text in it", () => {
    // Ten tenths: naive float summation gives 0.9999999999999999; the compensated sum gives 1 (hand-worked).
    expect(rowSum(new Array(10).fill(0.1))).toBe(1);
    expect(rowSum([0.5, "x"])).toBeNull();
    expect(rowIsOff([0.5, 0.5])).toBe(false);
    expect(rowIsOff([0.5, 0.4])).toBe(true);
    expect(rowIsOff([0.5, "half"])).toBe(true);
  });

  it("divides a row by its sum and rounds away float noise", () => {
    // [2, 1, 1] / 4 = [0.5, 0.25, 0.25] (hand-worked).
    expect(normaliseRow([2, 1, 1])).toEqual([0.5, 0.25, 0.25]);
    const third = normaliseRow([1, 1, 1]);
    expect(Math.abs((rowSum(third) as number) - 1)).toBeLessThanOrEqual(1e-12);
    expect(String(third[1])).toBe("0.333333333333");
  });

  it("leaves rows it cannot scale as they are (text, a negative entry, a zero sum)", () => {
    expect(normaliseRow([0.5, "x"])).toEqual([0.5, "x"]);
    expect(normaliseRow([1.2, -0.1])).toEqual([1.2, -0.1]);
    expect(normaliseRow([0, 0])).toEqual([0, 0]);
  });
});

describe("removing a state", () => {
  const P = [
    [0.5, 0.3, 0.2],
    [0.1, 0.6, 0.3],
    [0.2, 0.2, 0.5], // already off (sums to 0.9): left as it is
  ];

  it("drops the state's row and column and rescales rows that summed to 1", () => {
    const src = sourcesAfterRemove(3, 1);
    const next = renormaliseKeptRows(remapMatrix(P, src, src), src, P);
    // Row 0 without its 0.3: [0.5, 0.2] / 0.7; row 2 was off and stays [0.2, 0.5] (hand-worked).
    expect(next[0]).toEqual([Number((0.5 / 0.7).toPrecision(12)), Number((0.2 / 0.7).toPrecision(12))]);
    expect(Math.abs((rowSum(next[0]) as number) - 1)).toBeLessThanOrEqual(1e-12);
    expect(next[1]).toEqual([0.2, 0.5]);
  });

  it("keeps a row whose whole mass went to the removed state at 0, for the grid to mark", () => {
    const Q = [
      [0, 1],
      [0.5, 0.5],
    ];
    const src = sourcesAfterRemove(2, 1);
    expect(renormaliseKeptRows(remapMatrix(Q, src, src), src, Q)).toEqual([[0]]);
  });

  it("maps order-2 contexts to the old rows with the same symbols", () => {
    // Alphabet [a, b, c] → [a, c]: contexts aa, ac, ca, cc were rows 0, 2, 6, 8 of the 3² contexts (hand-worked).
    expect(contextSources([0, 2], 3, 2)).toEqual([0, 2, 6, 8]);
    expect(contextRowLabels(["a", "c"], 2)).toEqual(["a·a", "a·c", "c·a", "c·c"]);
  });
});

describe("edges from CSV", () => {
  it("reads u,v,w lines, skips a header, comments and blank lines, and accepts tabs and semicolons", () => {
    const { edges, problems } = parseEdgeCsv("u,v,w\n# the dock side\ndock,aisle-1,3\n\ndock\taisle-2\t2\naisle-2 ; charger ; 0.5\n");
    expect(problems).toEqual([]);
    expect(edges).toEqual([
      ["dock", "aisle-1", 3],
      ["dock", "aisle-2", 2],
      ["aisle-2", "charger", 0.5],
    ]);
  });

  it("names each line it cannot read, numbered from 1", () => {
    const { problems } = parseEdgeCsv("dock,aisle-1,3\ndock aisle-2\naisle-2,charger,heavy\n");
    expect(problems).toEqual(['line 2: expected "u,v,w"; got "dock aisle-2"', 'line 3: the weight "heavy" is not a number']);
  });
});
