// The review queue's URL parameters and its order (common practice, no source: the checks are the
// rules the queue promises its readers, written out by hand).
import { describe, expect, it } from "vitest";
import { reviewQuerySchema, sortQueue } from "~/review-queue";

const row = (title: string, state: "submitted" | "resubmitted" | "changes-requested" | "accepted", created: string, updated: string, authorName = "Ana", family = "iid") => ({
  title,
  state,
  family,
  authorName,
  createdAt: new Date(created),
  updatedAt: new Date(updated),
});

const rows = [
  row("Tide gauge bits", "resubmitted", "2026-11-03T10:00:00Z", "2026-11-20T10:00:00Z", "bea", "markov"),
  row("anchor chain", "submitted", "2026-11-01T10:00:00Z", "2026-11-02T10:00:00Z", "Cai", "hidden"),
  row("Relay tallies", "accepted", "2026-11-05T10:00:00Z", "2026-11-06T10:00:00Z", "Ana", "iid"),
  row("Buoy swell", "changes-requested", "2026-11-02T10:00:00Z", "2026-11-25T10:00:00Z", "Ana", "two-state"),
];

describe("reviewQuerySchema", () => {
  it("defaults to open proposals of any family, longest waiting first", () => {
    expect(reviewQuerySchema.parse({})).toEqual({ state: "open", family: "any", olderThan: 0, sort: "age", dir: "asc" });
  });

  it("reads the values a shared URL carries, numbers included", () => {
    expect(reviewQuerySchema.parse({ state: "changes-requested", family: "graph-walk", olderThan: "7", sort: "title", dir: "desc" })).toEqual({
      state: "changes-requested",
      family: "graph-walk",
      olderThan: 7,
      sort: "title",
      dir: "desc",
    });
  });

  it("names the parameter and the allowed values when one is wrong", () => {
    const cases: [Record<string, string>, RegExp][] = [
      [{ state: "pending" }, /state must be one of open, all, submitted/],
      [{ family: "ising" }, /family must be any or one of iid, markov/],
      [{ olderThan: "a week" }, /olderThan must be a number of days/],
      [{ olderThan: "1.5" }, /whole number of days/],
      [{ sort: "score" }, /sort must be one of age, updated, title/],
      [{ dir: "up" }, /dir must be asc or desc/],
    ];
    for (const [query, message] of cases) {
      const parsed = reviewQuerySchema.safeParse(query);
      expect(parsed.success).toBe(false);
      if (!parsed.success) expect(parsed.error.issues[0].message).toMatch(message);
    }
  });
});

describe("sortQueue", () => {
  const titles = (r: { title: string }[]) => r.map((x) => x.title);

  it("puts the oldest submission first by age, the newest first when reversed", () => {
    expect(titles(sortQueue(rows, "age", "asc"))).toEqual(["anchor chain", "Buoy swell", "Tide gauge bits", "Relay tallies"]);
    expect(titles(sortQueue(rows, "age", "desc"))).toEqual(["Relay tallies", "Tide gauge bits", "Buoy swell", "anchor chain"]);
  });

  it("sorts titles and authors without regard to case", () => {
    expect(titles(sortQueue(rows, "title", "asc"))).toEqual(["anchor chain", "Buoy swell", "Relay tallies", "Tide gauge bits"]);
    // Ana twice (ties by submission time: Buoy swell on the 2nd, Relay tallies on the 5th), then bea, Cai.
    expect(titles(sortQueue(rows, "author", "asc"))).toEqual(["Buoy swell", "Relay tallies", "Tide gauge bits", "anchor chain"]);
  });

  it("orders states as the work waits: submitted, resubmitted, changes requested, then decided", () => {
    expect(sortQueue(rows, "state", "asc").map((r) => r.state)).toEqual(["submitted", "resubmitted", "changes-requested", "accepted"]);
  });

  it("sorts by last change and by family", () => {
    expect(titles(sortQueue(rows, "updated", "desc"))).toEqual(["Buoy swell", "Tide gauge bits", "Relay tallies", "anchor chain"]);
    expect(sortQueue(rows, "family", "asc").map((r) => r.family)).toEqual(["hidden", "iid", "markov", "two-state"]);
  });

  it("leaves its input as it was", () => {
    const before = titles(rows);
    sortQueue(rows, "title", "desc");
    expect(titles(rows)).toEqual(before);
  });
});
