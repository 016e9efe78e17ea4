/**
 * The review queue's filters and order, read from the URL so a filtered queue can be shared.
 * Pure and client-safe; the loader filters and sorts, and the unit tests call it directly.
 */
import { z } from "zod";
import { FAMILIES as families } from "~/engine/schema";
import { proposalStateLabels, type ProposalState } from "~/proposal-forms";

export const queueSorts = ["age", "updated", "title", "state", "family", "author"] as const;
export type QueueSort = (typeof queueSorts)[number];

const states = ["open", "all", ...(Object.keys(proposalStateLabels) as ProposalState[])] as const;

export const reviewQuerySchema = z.object({
  state: z.enum(states, { error: `state must be one of ${states.join(", ")}` }).default("open"),
  family: z.enum(["any", ...families], { error: `family must be any or one of ${families.join(", ")}` }).default("any"),
  olderThan: z.coerce.number({ error: "olderThan must be a number of days" }).int("olderThan must be a whole number of days").min(0).max(3650).default(0),
  // Oldest first by default: the proposal that has waited longest comes first.
  sort: z.enum(queueSorts, { error: `sort must be one of ${queueSorts.join(", ")}` }).default("age"),
  dir: z.enum(["asc", "desc"], { error: "dir must be asc or desc" }).default("asc"),
});
export type ReviewQuery = z.infer<typeof reviewQuerySchema>;

/** Order in which states read in the queue: waiting first, then decided. */
const stateOrder: Record<ProposalState, number> = { submitted: 0, resubmitted: 1, "changes-requested": 2, accepted: 3, declined: 4, withdrawn: 5 };

interface Sortable {
  title: string;
  state: ProposalState;
  family: string;
  authorName: string;
  createdAt: Date | string;
  updatedAt: Date | string;
}

/**
 * Sorts a copy of the rows. "age" ascending means the longest-waiting first (oldest submission);
 * ties fall back to the submission time, so the order is stable and total.
 */
export function sortQueue<T extends Sortable>(rows: readonly T[], sort: QueueSort, dir: "asc" | "desc"): T[] {
  const time = (d: Date | string) => new Date(d).getTime();
  const text = (a: string, b: string) => a.localeCompare(b, "en", { sensitivity: "base" });
  const by: Record<QueueSort, (a: T, b: T) => number> = {
    age: (a, b) => time(a.createdAt) - time(b.createdAt),
    updated: (a, b) => time(a.updatedAt) - time(b.updatedAt),
    title: (a, b) => text(a.title, b.title),
    state: (a, b) => stateOrder[a.state] - stateOrder[b.state],
    family: (a, b) => text(a.family, b.family),
    author: (a, b) => text(a.authorName, b.authorName),
  };
  const sign = dir === "asc" ? 1 : -1;
  return [...rows].sort((a, b) => sign * by[sort](a, b) || time(a.createdAt) - time(b.createdAt));
}
