import { useState } from "react";
import { data, Form, Link, redirect, useNavigation } from "react-router";
import { requireContributor } from "~/.server/auth.server";
import { openProposalOfItem, submitProposal } from "~/.server/proposals.server";
import { getWorkspaceItem } from "~/.server/workspace.server";
import { familyLabels } from "~/families";
import type { InputIssue } from "~/engine";
import {
  CHANGE_NOTE_MAX,
  formIssues,
  PROVENANCE_MAX,
  proposalStateLabels,
  SLUG_MAX,
  SUMMARY_MAX,
  submitFormSchema,
  type ProposalKind,
} from "~/proposal-forms";
import type { Route } from "./+types/submit";

export const meta: Route.MetaFunction = ({ data: d }) => [{ title: `Submit ${d?.item.title ?? "item"} for review · Ergoshelf` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireContributor(request);
  const item = await getWorkspaceItem(user.id, params.id);
  if (!item) throw data({ message: "There is no such item in your workspace." }, { status: 404 });
  const open = await openProposalOfItem(item.id);
  return {
    item: { id: item.id, title: item.title, family: item.family, revision: item.revision, notes: item.notes, source: item.source, sourceModel: item.sourceModel },
    open,
  };
}

export interface SubmitActionData {
  message: string;
  issues: InputIssue[];
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireContributor(request);
  const form = Object.fromEntries(await request.formData());
  const parsed = submitFormSchema.safeParse(form);
  if (!parsed.success) {
    const issues = formIssues(parsed.error);
    return data<SubmitActionData>({ message: `Not submitted: ${issues[0].message}.`, issues }, { status: 400 });
  }
  const outcome = await submitProposal(user, params.id, parsed.data);
  if (!outcome.ok) {
    if (outcome.status === 404) throw data({ message: outcome.message }, { status: 404 });
    return data<SubmitActionData>({ message: outcome.message, issues: outcome.issues }, { status: outcome.status });
  }
  return redirect(`/workspace/proposals/${outcome.value.id}`);
}

/** A slug suggestion from a title: lower case, ASCII letters and digits, single hyphens. */
function slugFrom(title: string): string {
  return title
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/\(copy\)/g, "")
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, SLUG_MAX)
    .replace(/-+$/, "");
}

function FieldError({ id, issues, path }: { id: string; issues: InputIssue[]; path: string }) {
  const issue = issues.find((i) => i.path === path);
  if (!issue) return null;
  return (
    <p id={id} className="mt-1 text-sm text-bad">
      <span aria-hidden="true">✕ </span>
      {issue.message}
    </p>
  );
}

export default function SubmitPage({ loaderData, actionData }: Route.ComponentProps) {
  const { item, open } = loaderData;
  const navigation = useNavigation();
  const [kind, setKind] = useState<ProposalKind>(item.sourceModel ? "new-edition" : "new-model");
  const issues = actionData?.issues ?? [];
  const invalid = (path: string) => (issues.some((i) => i.path === path) ? { "aria-invalid": true, "aria-describedby": `${path}-error` } : {});
  const busy = navigation.state === "submitting";

  return (
    <div className="max-w-3xl">
      <p className="eyebrow">
        <Link to="/workspace">Workspace</Link> · <Link to={`/workspace/${item.id}`}>{item.title}</Link>
      </p>
      <h1 className="mt-1 text-2xl font-bold">Submit for review</h1>
      <p className="mt-2 text-ink-soft">
        The curators receive a frozen copy of <span className="font-semibold text-ink">revision {item.revision}</span> of this {familyLabels[item.family]} item,
        with figures the server recomputes and verifies now. You can go on editing the item; if the curators ask for changes, you save a new revision and
        resubmit.
      </p>

      {open ? (
        <div className="card mt-6 p-4" role="status">
          <p className="font-semibold">This item already has an open proposal ({proposalStateLabels[open.state].toLowerCase()}).</p>
          <p className="mt-1 text-sm text-ink-soft">Follow it up there: reply to the curators, resubmit when they ask for changes, or withdraw it.</p>
          <Link to={`/workspace/proposals/${open.id}`} className="btn btn-primary mt-3">
            Open the proposal
          </Link>
        </div>
      ) : (
        <Form method="post" className="card mt-6 space-y-5 p-5" noValidate>
          {actionData && (
            <div className="rounded border border-bad/40 bg-bad/5 p-3 text-sm text-bad" role="alert">
              <span aria-hidden="true">✕ </span>
              {actionData.message}
            </div>
          )}
          <fieldset>
            <legend className="text-sm font-semibold">What are you proposing?</legend>
            <div className="mt-2 space-y-2">
              <label className={`flex gap-3 rounded border p-3 ${item.sourceModel ? "border-rule" : "border-rule opacity-60"}`}>
                <input type="radio" name="kind" value="new-edition" checked={kind === "new-edition"} disabled={!item.sourceModel} onChange={() => setKind("new-edition")} />
                <span>
                  <span className="font-semibold">A new edition</span>
                  {item.sourceModel ? (
                    <span className="block text-sm text-ink-soft">
                      of <Link to={item.sourceModel.path}>{item.sourceModel.title}</Link>, which this item was cloned from (edition {item.sourceModel.edition}). Earlier
                      editions stay citable.
                    </span>
                  ) : (
                    <span className="block text-sm text-ink-soft">Only for an item cloned from a library edition.</span>
                  )}
                </span>
              </label>
              <label className="flex gap-3 rounded border border-rule p-3">
                <input type="radio" name="kind" value="new-model" checked={kind === "new-model"} onChange={() => setKind("new-model")} />
                <span>
                  <span className="font-semibold">A new model</span>
                  <span className="block text-sm text-ink-soft">A separate entry in the library, starting at edition 1.</span>
                </span>
              </label>
            </div>
            <FieldError id="kind-error" issues={issues} path="kind" />
          </fieldset>

          {kind === "new-model" && (
            <div className="space-y-4 border-l-2 border-rule pl-4">
              <div>
                <label htmlFor="title" className="block text-sm font-semibold">Title in the library</label>
                <input id="title" name="title" className="field mt-1" defaultValue={item.title.replace(/\s*\(copy\)$/, "")} maxLength={160} {...invalid("title")} />
                <FieldError id="title-error" issues={issues} path="title" />
              </div>
              <div>
                <label htmlFor="slug" className="block text-sm font-semibold">Slug</label>
                <input id="slug" name="slug" className="field mt-1 font-mono" defaultValue={slugFrom(item.title)} maxLength={SLUG_MAX} aria-describedby="slug-help" {...invalid("slug")} />
                <p id="slug-help" className="mt-1 text-xs text-ink-soft">
                  The model's permanent name in its URL and citation key, e.g. <code className="font-mono">ergoshelf:{slugFrom(item.title) || "your-slug"}@1</code>. It cannot
                  change after publication.
                </p>
                <FieldError id="slug-error" issues={issues} path="slug" />
              </div>
              <div>
                <label htmlFor="summary" className="block text-sm font-semibold">Summary</label>
                <textarea id="summary" name="summary" className="field mt-1 h-20 text-sm" maxLength={SUMMARY_MAX} defaultValue={item.notes} {...invalid("summary")} />
                <FieldError id="summary-error" issues={issues} path="summary" />
              </div>
              <div>
                <label htmlFor="tags" className="block text-sm font-semibold">Tags</label>
                <input id="tags" name="tags" className="field mt-1" placeholder="telemetry, buoy, hourly" aria-describedby="tags-help" {...invalid("tags")} />
                <p id="tags-help" className="mt-1 text-xs text-ink-soft">Separated by commas; at most 20.</p>
                <FieldError id="tags-error" issues={issues} path="tags" />
              </div>
              <div>
                <label htmlFor="provenance" className="block text-sm font-semibold">Provenance</label>
                <textarea
                  id="provenance"
                  name="provenance"
                  className="field mt-1 h-20 text-sm"
                  maxLength={PROVENANCE_MAX}
                  placeholder="Where the data came from, how the parameters were fitted, and over what period."
                  {...invalid("provenance")}
                />
                <FieldError id="provenance-error" issues={issues} path="provenance" />
              </div>
            </div>
          )}

          <div>
            <label htmlFor="changeNote" className="block text-sm font-semibold">Change note for the curators</label>
            <textarea
              id="changeNote"
              name="changeNote"
              className="field mt-1 h-28 text-sm"
              maxLength={CHANGE_NOTE_MAX}
              required
              placeholder={kind === "new-edition" ? "What changed from the current edition, and why." : "What the model describes, and why it belongs in the library."}
              aria-describedby="changeNote-help"
              {...invalid("changeNote")}
            />
            <p id="changeNote-help" className="mt-1 text-xs text-ink-soft">Required. It opens the review thread and appears in the edition history once published.</p>
            <FieldError id="changeNote-error" issues={issues} path="changeNote" />
          </div>

          <div className="flex flex-wrap items-center gap-3">
            <button type="submit" className="btn btn-primary" disabled={busy}>
              {busy ? "Verifying and submitting…" : `Submit revision ${item.revision}`}
            </button>
            <Link to={`/workspace/${item.id}`} className="btn btn-quiet">
              Back to the item
            </Link>
          </div>
        </Form>
      )}
    </div>
  );
}
