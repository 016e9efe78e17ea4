import { describe, expect, it } from "vitest";
import { parseComputeRequest, parseModel } from "~/engine/validate";
import { LIMITS } from "~/engine/schema";

// Scenario: a fictional coastal buoy network whose sea-state log uses the symbols a (calm),
// b (chop), c (swell), d (storm).
const sea = ["a", "b", "c", "d"];

function issuesOf(input: unknown) {
  const r = parseComputeRequest(input);
  if (r.ok) throw new Error("expected the request to be rejected");
  return r.error;
}

function firstIssue(input: unknown) {
  return issuesOf(input).issues[0];
}

describe("row sums", () => {
  it("names the row, its label, its sum and how far off it is", () => {
    const P = [
      [1, 0, 0, 0],
      [0.5, 0.5, 0, 0],
      [0, 0.2, 0.7, 0.1],
      [0.5, 0.48, 0, 0],
    ];
    const err = issuesOf({ model: { family: "markov", alphabet: sea, P } });
    expect(err.issues).toEqual([{ path: "model.P[3]", message: 'row 3 ("d") sums to 0.98, not 1 (off by 0.02)' }]);
    expect(err.message).toBe('row 3 ("d") sums to 0.98, not 1 (off by 0.02)');
  });

  it("accepts 0.7 + 0.2 + 0.1, which is 0.9999999999999999 in floating point", () => {
    const r = parseModel({ family: "iid", alphabet: ["a", "b", "c"], p: [0.7, 0.2, 0.1] });
    expect(r.ok).toBe(true);
  });

  it("rejects an i.i.d. p that does not sum to 1", () => {
    expect(firstIssue({ model: { family: "iid", alphabet: ["a", "b"], p: [0.3, 0.6] } })).toEqual({
      path: "model.p",
      message: "p sums to 0.9, not 1 (off by 0.1)",
    });
  });

  it("rejects an emission row that does not sum to 1, naming B", () => {
    const m = { family: "hidden", states: ["s", "t"], alphabet: ["x", "y"], P: [[0.5, 0.5], [0.5, 0.5]], B: [[0.5, 0.5], [0.6, 0.6]] };
    expect(firstIssue({ model: m })).toEqual({ path: "model.B[1]", message: 'B row 1 ("t") sums to 1.2, not 1 (off by 0.2)' });
  });
});

describe("entries", () => {
  it("names a negative entry", () => {
    const P = [
      [1, 0, 0],
      [0.5, 0.5, 0],
      [0.6, -0.1, 0.5],
    ];
    const err = issuesOf({ model: { family: "markov", alphabet: ["a", "b", "c"], P } });
    expect(err.issues).toContainEqual({ path: "model.P[2][1]", message: "P[2][1] is negative (-0.1)" });
  });

  it("names a cell that is a string, null or missing", () => {
    const P = [
      [0.5, 0.5, "0"],
      [null, 0.5, 0.5],
      [0.5, 0.5, 0],
    ];
    const err = issuesOf({ model: { family: "markov", alphabet: ["a", "b", "c"], P } });
    expect(err.issues).toContainEqual({ path: "model.P[0][2]", message: 'P[0][2] is not a finite number; got "0" (a string)' });
    expect(err.issues).toContainEqual({ path: "model.P[1][0]", message: "P[1][0] is not a finite number; got null" });
  });

  it("names an entry above 1", () => {
    const err = issuesOf({ model: { family: "markov", alphabet: ["a", "b"], P: [[1.5, -0.5], [0.5, 0.5]] } });
    expect(err.issues).toContainEqual({ path: "model.P[0][0]", message: "P[0][0] is greater than 1 (1.5)" });
    expect(err.issues).toContainEqual({ path: "model.P[0][1]", message: "P[0][1] is negative (-0.5)" });
  });

  it("rejects a two-state parameter outside [0, 1] and one that is not a number", () => {
    const err = issuesOf({ model: { family: "two-state", alphabet: ["calm", "swell"], a: 1.2, b: 0.1 } });
    expect(err.issues).toEqual([{ path: "model.a", message: "a must be a probability in [0, 1]; got 1.2" }]);
    const err2 = issuesOf({ model: { family: "two-state", alphabet: ["calm", "swell"], a: 0.2, b: "0.1" } });
    expect(err2.issues).toEqual([{ path: "model.b", message: 'b must be a finite number; got "0.1" (a string)' }]);
  });
});

describe("labels and dimensions", () => {
  it("finds a duplicate in the alphabet", () => {
    expect(firstIssue({ model: { family: "iid", alphabet: ["a", "b", "c", "a"], p: [0.25, 0.25, 0.25, 0.25] } })).toEqual({
      path: "model.alphabet[3]",
      message: 'alphabet has a duplicate: "a" at 0 and 3',
    });
  });

  it("counts the rows an order-k chain needs", () => {
    const P = Array.from({ length: 8 }, () => [1, 0, 0]);
    expect(firstIssue({ model: { family: "markov", alphabet: ["a", "b", "c"], order: 2, P } })).toEqual({
      path: "model.P",
      message: "an order-2 chain over 3 symbols needs 9 rows (one per context, in lexicographic order); got 8",
    });
  });

  it("names a row of the wrong length with its context label", () => {
    const P = [[0.5, 0.5], [0.5, 0.5], [1], [0.5, 0.5]];
    expect(firstIssue({ model: { family: "markov", alphabet: ["a", "b"], order: 2, P } })).toEqual({
      path: "model.P[2]",
      message: 'row 2 ("b·a") has 1 entries but the alphabet has 2 symbols',
    });
  });

  it("checks B against the hidden states", () => {
    const P = Array.from({ length: 4 }, () => [0.25, 0.25, 0.25, 0.25]);
    const m = { family: "hidden", states: ["s0", "s1", "s2", "s3"], alphabet: ["x", "y"], P, B: [[1, 0], [1, 0], [1, 0]] };
    expect(firstIssue({ model: m })).toEqual({ path: "model.B", message: "B has 3 rows but there are 4 states" });
  });

  it("rejects an unknown family and a missing one", () => {
    expect(firstIssue({ model: { family: "renewal" } }).message).toMatch(/^unknown family "renewal"/);
    expect(firstIssue({ model: { alphabet: ["a"] } })).toMatchObject({ path: "model.family", message: expect.stringMatching(/^family is missing/) });
    expect(firstIssue({})).toEqual({ path: "model", message: "model is missing" });
  });

  it("rejects an unexpected field", () => {
    expect(firstIssue({ model: { family: "iid", alphabet: ["a"], p: [1], P: [[1]] } })).toEqual({
      path: "model.P",
      message: 'unexpected field "P" for the iid family',
    });
  });
});

describe("graphs", () => {
  const nodes = ["dock", "aisle", "rack", "charger"];
  it("names an edge with an unknown node", () => {
    const edges = [["dock", "aisle", 1], ["aisle", "rack", 1], ["rack", "charger", 1], ["rack", "x", 2]];
    expect(firstIssue({ model: { family: "graph-walk", nodes, edges } })).toEqual({ path: "model.edges[3]", message: 'edge 3 names an unknown node "x"' });
  });

  it("names a node without edges", () => {
    const edges = [["dock", "aisle", 1], ["aisle", "rack", 1]];
    expect(firstIssue({ model: { family: "graph-walk", nodes, edges } })).toEqual({ path: "model.nodes[3]", message: 'node "charger" has no edges (weight 0)' });
  });

  it("names a negative weight", () => {
    const edges = [["dock", "aisle", 1], ["aisle", "rack", 1], ["rack", "charger", 1], ["dock", "dock", 1], ["charger", "dock", -2]];
    expect(firstIssue({ model: { family: "graph-walk", nodes, edges } })).toEqual({ path: "model.edges[4]", message: "edge 4 has a negative weight (-2)" });
  });

  it("names an edge that is not a triple", () => {
    expect(firstIssue({ model: { family: "graph-walk", nodes, edges: [["dock", "aisle"]] } })).toEqual({ path: "model.edges[0]", message: "edge 0 must be [u, v, w]; got 2 entries" });
  });
});

describe("sparse transitions", () => {
  const alphabet = ["idle", "busy", "fault"];
  it("accepts a valid list and fills order 1", () => {
    const r = parseModel({ family: "markov", alphabet, transitions: [[0, 1, 1], [1, 0, 0.5], [1, 2, 0.5], [2, 0, 1]] });
    expect(r.ok && r.value.family === "markov" && r.value.order).toBe(1);
  });
  it("names an index out of range, a repeat and a state without transitions", () => {
    const out = issuesOf({ model: { family: "markov", alphabet, transitions: [[0, 1, 1], [1, 3, 1]] } });
    expect(out.issues).toEqual([{ path: "model.transitions[1]", message: "transition 1 names state 3, but the alphabet has 3 symbols (indices 0 to 2)" }]);
    const rep = issuesOf({ model: { family: "markov", alphabet, transitions: [[0, 1, 1], [1, 0, 0.5], [1, 0, 0.5], [2, 0, 1]] } });
    expect(rep.issues).toContainEqual({ path: "model.transitions[2]", message: "transition 2 repeats P[1][0] (first given by transition 1)" });
    const none = issuesOf({ model: { family: "markov", alphabet, transitions: [[0, 1, 1], [1, 0, 1]] } });
    expect(none.issues).toEqual([{ path: "model.transitions", message: 'row 2 ("fault") has no transitions (sums to 0); every state needs at least one' }]);
  });
  it("refuses P and transitions together", () => {
    expect(firstIssue({ model: { family: "markov", alphabet, P: [[1]], transitions: [] } }).message).toBe("give either P or transitions, not both");
  });
});

describe("normalise opt-in", () => {
  it("rescales rows that are off and notes each one", () => {
    const r = parseComputeRequest({ model: { family: "markov", alphabet: ["a", "b"], P: [[0.3, 0.6], [0.5, 0.5]] }, normalize: true });
    expect(r.ok).toBe(true);
    if (!r.ok || r.value.model.family !== "markov") return;
    expect(r.value.model.P![0][0]).toBeCloseTo(1 / 3, 15);
    expect(r.value.model.P![0][1]).toBeCloseTo(2 / 3, 15);
    expect(r.value.model.P![1]).toEqual([0.5, 0.5]);
    expect(r.notes).toEqual(['row 0 ("a") summed to 0.9; rescaled to sum to 1']);
  });

  it("never normalises a zero row", () => {
    const err = issuesOf({ model: { family: "markov", alphabet: ["a", "b"], P: [[0, 0], [0.5, 0.5]] }, normalize: true });
    expect(err.issues).toEqual([{ path: "model.P[0]", message: 'row 0 ("a") sums to 0 and cannot be normalised; it needs at least one positive entry' }]);
  });

  it("is off by default", () => {
    expect(parseModel({ family: "iid", alphabet: ["a", "b"], p: [0.3, 0.6] }).ok).toBe(false);
    expect(parseModel({ family: "iid", alphabet: ["a", "b"], p: [0.3, 0.6] }, { normalize: true }).ok).toBe(true);
  });

  it("does not hide a negative entry", () => {
    const err = issuesOf({ model: { family: "iid", alphabet: ["a", "b"], p: [-0.1, 0.6] }, normalize: true });
    expect(err.issues).toEqual([{ path: "model.p[0]", message: "p[0] is negative (-0.1)" }]);
  });
});

describe("size limits", () => {
  it("counts |A|^k against the dense limit", () => {
    const alphabet = Array.from({ length: 20 }, (_, i) => `s${i}`);
    expect(firstIssue({ model: { family: "markov", alphabet, order: 3, P: [] } })).toEqual({
      path: "model.order",
      message: "an order-3 chain over 20 symbols has 8,000 contexts (states); the limit is 4,096",
    });
  });

  it("limits the number of edges", () => {
    const edges = { length: LIMITS.edges + 1 } as unknown[];
    const err = issuesOf({ model: { family: "graph-walk", nodes: ["a"], edges: Array.from(edges, () => ["a", "a", 1]) } });
    expect(err.issues).toEqual([{ path: "model.edges", message: "edges has 2,000,001 entries; the limit is 2,000,000" }]);
  });

  it("limits hidden states", () => {
    const states = Array.from({ length: 257 }, (_, i) => i);
    expect(firstIssue({ model: { family: "hidden", states, alphabet: ["x"], P: [], B: [] } })).toEqual({
      path: "model.states",
      message: "states has 257 entries; the limit is 256",
    });
  });

  it("limits Rényi orders and block lengths, and checks each order", () => {
    const model = { family: "iid", alphabet: ["a"], p: [1] };
    expect(firstIssue({ model, renyiOrders: Array.from({ length: 33 }, (_, i) => i + 2) })).toEqual({
      path: "renyiOrders",
      message: "renyiOrders has 33 entries; the limit is 32",
    });
    const err = issuesOf({ model, renyiOrders: [2, 1, 0] });
    expect(err.issues).toEqual([
      { path: "renyiOrders[1]", message: "renyiOrders[1] is 1, which is the Shannon rate itself; use an order ≠ 1" },
      { path: "renyiOrders[2]", message: "renyiOrders[2] must be > 0; got 0" },
    ]);
    expect(firstIssue({ model, blockLengths: 65 })).toEqual({
      path: "blockLengths",
      message: "blockLengths must be an integer from 1 to 64 (the limit); got 65",
    });
  });
});

describe("collecting issues", () => {
  it("reports several problems at once", () => {
    const P = [
      [0.5, 0.4, 0],
      [0.5, -0.5, 1],
      [0.2, 0.2, 0.2],
    ];
    const err = issuesOf({ model: { family: "markov", alphabet: ["a", "b", "c"], P } });
    expect(err.issues.map((i) => i.path)).toEqual(["model.P[0]", "model.P[1][1]", "model.P[2]"]);
    expect(err.message).toMatch(/^3 problems with the request; the first: row 0/);
  });

  it("stops at the cap", () => {
    const p = Array.from({ length: 200 }, () => "x");
    const err = issuesOf({ model: { family: "iid", alphabet: Array.from({ length: 200 }, (_, i) => i), p } });
    expect(err.issues).toHaveLength(LIMITS.issues);
    expect(err.message).toMatch(/^more than 50 problems/);
  });

  it("never throws on junk", () => {
    for (const junk of [null, 3, "x", [], { model: null }, { model: [] }, { model: { family: "markov", alphabet: "ab" } }]) {
      const r = parseComputeRequest(junk);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error.issues.length).toBeGreaterThan(0);
    }
  });
});
