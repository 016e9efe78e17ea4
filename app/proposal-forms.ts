/**
 * The proposal and review forms' fields: zod schemas and limits shared by the routes (which parse
 * with them) and the forms (which use the limits). Client-safe.
 */
import { z } from "zod";

export const NOTE_MAX = 4000;
export const CHANGE_NOTE_MAX = 2000;
export const SUMMARY_MAX = 2000;
export const PROVENANCE_MAX = 4000;
export const SLUG_MAX = 80;
export const TAGS_MAX = 20;

export const proposalStateLabels = {
  submitted: "Submitted",
  "changes-requested": "Changes requested",
  resubmitted: "Resubmitted",
  accepted: "Accepted",
  declined: "Declined",
  withdrawn: "Withdrawn",
} as const;
export type ProposalState = keyof typeof proposalStateLabels;
export const openProposalStates: readonly ProposalState[] = ["submitted", "changes-requested", "resubmitted"];

export const proposalKindLabels = { "new-model": "New model", "new-edition": "New edition" } as const;
export type ProposalKind = keyof typeof proposalKindLabels;

const requiredText = (what: string, max: number) =>
  z
    .string({ error: `${what} is needed` })
    .trim()
    .min(1, `${what} is needed`)
    .max(max, `${what} has at most ${max} characters`);

export const slugSchema = z
  .string({ error: "a slug is needed for a new model" })
  .trim()
  .min(3, "the slug needs at least 3 characters")
  .max(SLUG_MAX, `the slug has at most ${SLUG_MAX} characters`)
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "the slug uses lower-case letters, digits and single hyphens (e.g. buoy-k07-sea-state)");

/** "a, b , c" → ["a", "b", "c"]; each tag 1–40 characters, at most 20. */
export const tagsSchema = z
  .string()
  .default("")
  .transform((s) =>
    s
      .split(",")
      .map((t) => t.trim().toLowerCase())
      .filter(Boolean),
  )
  .pipe(z.array(z.string().max(40, "a tag has at most 40 characters")).max(TAGS_MAX, `at most ${TAGS_MAX} tags`))
  .transform((tags) => [...new Set(tags)]);

const changeNote = requiredText("a change note", CHANGE_NOTE_MAX);

export const submitFormSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("new-edition"), changeNote }),
  z.object({
    kind: z.literal("new-model"),
    changeNote,
    slug: slugSchema,
    title: requiredText("a title", 160),
    summary: requiredText("a summary", SUMMARY_MAX),
    tags: tagsSchema,
    provenance: z.string().trim().max(PROVENANCE_MAX, `provenance notes have at most ${PROVENANCE_MAX} characters`).default(""),
  }),
], { error: "choose whether this is a new edition or a new model" });
export type SubmitForm = z.infer<typeof submitFormSchema>;

export const resubmitFormSchema = z.object({ intent: z.literal("resubmit"), note: requiredText("a note on what changed", CHANGE_NOTE_MAX) });
export const withdrawFormSchema = z.object({
  intent: z.literal("withdraw"),
  note: z.string().trim().max(NOTE_MAX, `the note has at most ${NOTE_MAX} characters`).default(""),
});
export const commentFormSchema = z.object({ intent: z.literal("comment"), body: requiredText("a comment", NOTE_MAX) });

export const decisionLabels = { accept: "Accept and publish", "request-changes": "Ask for changes", decline: "Decline" } as const;
export type Decision = keyof typeof decisionLabels;
export const decisionFormSchema = z.object({
  intent: z.literal("decide"),
  decision: z.enum(["accept", "request-changes", "decline"], { error: "choose a decision: accept, ask for changes or decline" }),
  note: requiredText("a note for the author", NOTE_MAX),
});

/** The form's issues as `{ path, message }`, the shape the engine and the API use. */
export function formIssues(error: z.ZodError): { path: string; message: string }[] {
  return error.issues.map((i) => ({ path: i.path.map(String).join(".") || "form", message: i.message }));
}
