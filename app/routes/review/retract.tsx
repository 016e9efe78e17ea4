// /review/retract/:slug/:edition — a curator retracts a published edition, with a reason. The
// edition keeps resolving (citations stay valid) under a banner with that reason.
import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import { requireCurator } from "~/.server/auth.server";
import { retractEdition } from "~/.server/curation.server";
import { getEdition, getModelWithEditions } from "~/.server/library.server";
import { citationKey } from "~/citations";
import { formatDate } from "~/components/model/format";
import { familyLabels } from "~/families";
import { formIssues, NOTE_MAX } from "~/proposal-forms";
import type { Route } from "./+types/retract";

export const meta: Route.MetaFunction = ({ data: d }) => [{ title: `Retract ${d ? citationKey(d.slug, d.number) : "an edition"} · Ergoshelf` }];

const paramsSchema = z.object({ slug: z.string().regex(/^[a-z0-9-]{1,100}$/), edition: z.string().regex(/^[1-9]\d{0,5}$/) });
const retractFormSchema = z.object({
  reason: z
    .string({ error: "a reason is needed" })
    .trim()
    .min(10, "give the reason in a sentence (at least 10 characters): readers of the edition see it")
    .max(NOTE_MAX, `the reason has at most ${NOTE_MAX} characters`),
  confirm: z.literal("yes", { error: "tick the box to confirm that this edition should be retracted" }),
});

async function loadEdition(params: Route.LoaderArgs["params"]) {
  const p = paramsSchema.safeParse(params);
  const edition = p.success ? await getEdition(p.data.slug, Number(p.data.edition)) : null;
  if (!edition) throw data({ message: `There is no edition ${params.edition} of ${params.slug}.` }, { status: 404 });
  return edition;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireCurator(request);
  const e = await loadEdition(params);
  const list = (await getModelWithEditions(e.model.slug))?.editions ?? [];
  // What readers will be sent to once this edition is retracted: the newest other unretracted one.
  const successor = [...list].reverse().find((x) => x.number !== e.number && !x.retractedAt)?.number ?? null;
  return {
    slug: e.model.slug,
    title: e.model.title,
    family: e.model.family,
    number: e.number,
    publishedAt: e.publishedAt,
    retractedAt: e.retractedAt,
    retractionReason: e.retractionReason,
    successor,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireCurator(request);
  const e = await loadEdition(params);
  const parsed = retractFormSchema.safeParse(Object.fromEntries(await request.formData()));
  if (!parsed.success) {
    const issues = formIssues(parsed.error);
    return data({ message: `Not retracted: ${issues[0].message}.`, issues }, { status: 400 });
  }
  const outcome = await retractEdition(user, e.model.slug, e.number, parsed.data.reason);
  if (!outcome.ok) return data({ message: outcome.message, issues: [] }, { status: outcome.status });
  return redirect(`/library/${e.model.slug}/e/${e.number}`);
}

export default function RetractPage({ loaderData, actionData }: Route.ComponentProps) {
  const d = loaderData;
  const busy = useNavigation().state === "submitting";
  const issueFor = (path: string) => actionData?.issues.find((i) => i.path === path)?.message;

  return (
    <div className="max-w-2xl">
      <p className="eyebrow">
        <Link to="/review">Review</Link> · Retraction
      </p>
      <h1 className="mt-1 text-3xl font-bold">Retract edition {d.number}</h1>
      <p className="mt-2 text-ink-soft">
        <Link to={`/library/${d.slug}/e/${d.number}`}>{d.title}</Link> · {familyLabels[d.family] ?? d.family} · published {formatDate(d.publishedAt)} ·{" "}
        <code className="font-mono text-sm">{citationKey(d.slug, d.number)}</code>
      </p>
      {d.retractedAt ? (
        <div className="card mt-6 p-4" role="status">
          <p className="font-semibold">This edition was retracted on {formatDate(d.retractedAt)}.</p>
          <p className="mt-1 text-sm">Reason: {d.retractionReason}</p>
          <p className="mt-1 text-sm text-ink-soft">A retraction is final; publish a corrected edition through a proposal instead.</p>
        </div>
      ) : (
        <Form method="post" className="card mt-6 space-y-4 p-4" data-testid="retract-form">
          <div className="text-sm">
            <p>Retracting is final and public. The edition stays at its permanent address so that existing citations resolve, with a banner that gives your reason and tells readers not to rely on its figures.</p>
            <p className="mt-2">
              {d.successor !== null
                ? `The model page will show edition ${d.successor}, the newest edition that is not retracted.`
                : "No other edition of this model is unretracted: the model page will show this edition under the banner until a corrected edition is published."}
            </p>
          </div>
          <div>
            <label htmlFor="retract-reason" className="block text-sm font-semibold">Reason, as readers will see it</label>
            <textarea
              id="retract-reason"
              name="reason"
              className="field mt-1 h-28 text-sm"
              maxLength={NOTE_MAX}
              required
              aria-invalid={issueFor("reason") ? true : undefined}
              aria-describedby={issueFor("reason") ? "retract-reason-error" : undefined}
              placeholder="e.g. The fit used a log with a clock fault between 2 and 9 May; edition 3 refits without it."
            />
            {issueFor("reason") && (
              <p id="retract-reason-error" className="mt-1 text-sm text-bad">
                {issueFor("reason")}
              </p>
            )}
          </div>
          <label className="flex gap-2 text-sm">
            <input type="checkbox" name="confirm" value="yes" required />
            <span>I confirm that edition {d.number} should be retracted.</span>
          </label>
          {actionData && (
            <p className="text-sm text-bad" role="alert">
              {actionData.message}
            </p>
          )}
          <div className="flex gap-3">
            <button type="submit" className="btn btn-danger" disabled={busy}>
              {busy ? "Retracting…" : `Retract edition ${d.number}`}
            </button>
            <Link to={`/library/${d.slug}/e/${d.number}`} className="btn btn-quiet">
              Cancel
            </Link>
          </div>
        </Form>
      )}
    </div>
  );
}
