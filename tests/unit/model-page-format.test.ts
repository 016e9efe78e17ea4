// How the model page prints numbers: shared decimals in parameter tables, headline rates, spreads,
// engine notes, diagram labels and plot axes. Display rules are common practice, no source.
import { describe, expect, it } from "vitest";
import { niceAxis } from "~/components/model/axis";
import { formatHeadline, formatParamAt, formatSpread, sharedDecimals, tidyNumbersInText } from "~/components/model/format";
import { diagramLabel } from "~/components/model/transitions";

describe("sharedDecimals and formatParamAt", () => {
  it("gives a whole table the decimals its longest entry needs, so the points line up", () => {
    const row = [0.1, 0.12, 0.7, 0];
    const d = sharedDecimals(row);
    expect(d).toBe(2);
    expect(row.map((x) => formatParamAt(x, d))).toEqual(["0.10", "0.12", "0.70", "0"]);
  });
  it("ignores float noise and keeps integers whole when no entry has decimals", () => {
    expect(sharedDecimals([0.1 + 0.2, 0.7])).toBe(1);
    expect(formatParamAt(0.1 + 0.2, 1)).toBe("0.3");
    expect(sharedDecimals([19, 131.4])).toBe(1);
    expect(formatParamAt(19, 1)).toBe("19.0");
    expect(sharedDecimals([2, 5, 7])).toBe(0);
  });
  it("leaves entries that need scientific form out of the count and in their own form", () => {
    expect(sharedDecimals([1e-9, 0.5])).toBe(1);
    expect(formatParamAt(1e-9, 1)).toBe("1.0000e-9");
  });
});

describe("formatHeadline", () => {
  it("prints six decimals for ordinary rates and four significant digits below 0.001", () => {
    expect(formatHeadline(0.093105485354)).toBe("0.093105");
    expect(formatHeadline(0.00002137426288890686)).toBe("2.137e-5");
    expect(formatHeadline(0)).toBe("0.000000");
    expect(formatHeadline(Number.NaN)).toBe("—");
  });
});

describe("formatSpread", () => {
  it("keeps two significant digits, trailing zero included", () => {
    expect(formatSpread(0.002)).toBe("2.0e-3");
    expect(formatSpread(0.34)).toBe("3.4e-1");
    expect(formatSpread(0)).toBe("0");
  });
});

describe("tidyNumbersInText", () => {
  it("cuts raw doubles in an engine note and leaves short numbers alone", () => {
    const note = "entropy rate: midpoint of the sandwich bounds at n = 12, [1.2464761768421457, 1.2465670547420216] bits/symbol (half-width 0.00004543894993791486)";
    expect(tidyNumbersInText(note)).toBe("entropy rate: midpoint of the sandwich bounds at n = 12, [1.246476177, 1.246567055] bits/symbol (half-width 4.544e-5)");
    expect(tidyNumbersInText("order-2 chain lifted to 16 contexts, p = 0.25")).toBe("order-2 chain lifted to 16 contexts, p = 0.25");
  });
});

describe("diagramLabel", () => {
  it("rounds to three significant digits but never to a certainty or an impossibility", () => {
    expect(diagramLabel(0.9916)).toBe("0.992");
    expect(diagramLabel(0.999999)).toBe("0.999999");
    expect(diagramLabel(1)).toBe("1");
    expect(diagramLabel(0.0000001234567)).toBe("1.23e-7");
  });
});

describe("niceAxis", () => {
  it("covers the values with round steps and says how many decimals the labels need", () => {
    const a = niceAxis([1.19, 1.53, 1.25]);
    expect(a.ticks).toEqual([1.1, 1.2, 1.3, 1.4, 1.5, 1.6]);
    expect(a.decimals).toBe(1);
    expect(a.domain).toEqual([1.1, 1.6]);
  });
  it("starts at the floor when one is given and uses 2.5-steps with two decimals", () => {
    const a = niceAxis([0.9, 0.02], { floor: 0 });
    expect(a.ticks).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(a.decimals).toBe(2);
    expect(niceAxis([0, 90], { floor: 0 }).decimals).toBe(0);
  });
  it("gives a flat series a band around it instead of a zero-height axis", () => {
    const a = niceAxis([0.999535, 0.999535]);
    expect(a.domain[0]).toBeLessThan(0.999535);
    expect(a.domain[1]).toBeGreaterThan(0.999535);
  });
});
