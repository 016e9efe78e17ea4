/**
 * Input of the model page routes, parsed with zod: the edition in the path must be a positive
 * integer (else 400), and the diff form's ?from=&to= must be edition numbers when present.
 */
import { z } from "zod";

const positive = z.string().regex(/^[1-9][0-9]{0,8}$/, "must be a positive whole number, like 1 or 3");

export const editionParamSchema = z.object({ slug: z.string().min(1).max(200), edition: positive });
export const modelParamSchema = z.object({ slug: z.string().min(1).max(200) });
export const diffQuerySchema = z.object({ from: positive.optional(), to: positive.optional() });

/** The diff form's choices, or an error message for a 400. */
export function parseDiffQuery(url: string): { ok: true; from?: number; to?: number } | { ok: false; message: string } {
  const sp = new URL(url).searchParams;
  const raw = { from: sp.get("from") || undefined, to: sp.get("to") || undefined };
  const r = diffQuerySchema.safeParse(raw);
  if (!r.success) {
    const issue = r.error.issues[0];
    return { ok: false, message: `The comparison's “${String(issue.path[0])}” ${issue.message}.` };
  }
  return { ok: true, from: r.data.from ? Number(r.data.from) : undefined, to: r.data.to ? Number(r.data.to) : undefined };
}
