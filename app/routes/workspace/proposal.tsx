import { data, Form, Link, redirect, useNavigation } from "react-router";
import { requireContributor } from "~/.server/auth.server";
import { commentOnProposal, getProposalForAuthor, resubmitProposal, withdrawProposal } from "~/.server/proposals.server";
import { Parameters } from "~/components/model/parameters";
import { FiguresSection } from "~/components/model/figures-section";
import {
  CommentForm,
  ProposalHeading,
  Refusal,
  SnapshotComparison,
  Thread,
  VerificationTable,
  type ActionMessage,
} from "~/components/review/proposal-parts";
import { CHANGE_NOTE_MAX, commentFormSchema, formIssues, NOTE_MAX, openProposalStates, resubmitFormSchema, withdrawFormSchema } from "~/proposal-forms";
import stylesheet from "~/styles/model-page.css?url";
import type { Route } from "./+types/proposal";

export const links: Route.LinksFunction = () => [{ rel: "stylesheet", href: stylesheet }];

export const meta: Route.MetaFunction = ({ data: d }) => [{ title: `${d?.view.title ?? "Proposal"} · My proposals · Ergoshelf` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireContributor(request);
  const view = await getProposalForAuthor(user.id, params.id);
  if (!view) throw data({ message: "There is no such proposal among yours." }, { status: 404 });
  return { view };
}

function refused(intent: string, status: number, message: string, issues: ActionMessage["issues"] = []) {
  return data<ActionMessage>({ intent, message, issues }, { status });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireContributor(request);
  const form = Object.fromEntries(await request.formData());
  const intent = String(form.intent ?? "");
  const schema = intent === "resubmit" ? resubmitFormSchema : intent === "withdraw" ? withdrawFormSchema : intent === "comment" ? commentFormSchema : null;
  if (!schema) return refused(intent, 400, 'intent must be "resubmit", "withdraw" or "comment"', [{ path: "intent", message: "unknown intent" }]);
  const parsed = schema.safeParse(form);
  if (!parsed.success) {
    const issues = formIssues(parsed.error);
    return refused(intent, 400, `Not sent: ${issues[0].message}.`, issues);
  }
  const f = parsed.data as { intent: string; note?: string; body?: string };
  const outcome =
    intent === "resubmit"
      ? await resubmitProposal(user, params.id, f.note ?? "")
      : intent === "withdraw"
        ? await withdrawProposal(user, params.id, f.note ?? "")
        : await commentOnProposal(user, params.id, f.body ?? "");
  if (!outcome.ok) {
    if (outcome.status === 404) throw data({ message: outcome.message }, { status: 404 });
    return refused(intent, outcome.status, outcome.message, outcome.issues);
  }
  return redirect(`/workspace/proposals/${params.id}`);
}

export default function AuthorProposalPage({ loaderData, actionData }: Route.ComponentProps) {
  const { view } = loaderData;
  const navigation = useNavigation();
  const open = openProposalStates.includes(view.state);
  const busy = (intent: string) => navigation.state === "submitting" && navigation.formData?.get("intent") === intent;
  const lastRequest = [...view.thread].reverse().find((t) => t.kind === "changes-requested");
  return (
    <div className="space-y-6">
      <ProposalHeading
        view={view}
        eyebrow={
          <>
            <Link to="/workspace">Workspace</Link> · <Link to="/workspace/proposals">My proposals</Link>
          </>
        }
      />

      {view.state === "changes-requested" && (
        <section className="card border-warn/60 p-4" aria-labelledby="resubmit-title" data-testid="changes-requested">
          <h2 id="resubmit-title" className="font-semibold">
            <span aria-hidden="true">↺ </span>The curators asked for changes
          </h2>
          {lastRequest && <p className="mt-1 text-sm whitespace-pre-wrap">“{lastRequest.body}” — {lastRequest.authorName}</p>}
          {view.item ? (
            <>
              <p className="mt-2 text-sm text-ink-soft">
                Make the changes in <Link to={`/workspace/${view.item.id}`}>the workspace item</Link>, save them, and resubmit: the proposal will then hold revision{" "}
                {view.item.revision}
                {view.item.changedSinceSnapshot ? ` (it holds revision ${view.snapshot.revision} now)` : " — the same revision it holds now, so save your changes first"}.
              </p>
              <Form method="post" className="mt-3" preventScrollReset>
                <input type="hidden" name="intent" value="resubmit" />
                <label htmlFor="resubmit-note" className="block text-sm font-semibold">What you changed</label>
                <textarea id="resubmit-note" name="note" className="field mt-1 h-20 text-sm" maxLength={CHANGE_NOTE_MAX} required />
                <Refusal data={actionData} intent="resubmit" />
                <button type="submit" className="btn btn-primary mt-2" disabled={busy("resubmit")}>
                  {busy("resubmit") ? "Verifying and resubmitting…" : `Resubmit revision ${view.item.revision}`}
                </button>
              </Form>
            </>
          ) : (
            <p className="mt-2 text-sm">The workspace item of this proposal was deleted, so it cannot be resubmitted; withdraw it and submit a new one.</p>
          )}
        </section>
      )}

      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_24rem]">
        <div className="min-w-0 space-y-6">
          <section className="card p-4" aria-labelledby="note-title">
            <h2 id="note-title" className="font-semibold">Change note</h2>
            <p className="mt-1 text-sm whitespace-pre-wrap break-words">{view.changeNote}</p>
            {view.snapshot.model && (
              <dl className="mt-3 grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[8rem_1fr]">
                <dt className="font-semibold">Summary</dt>
                <dd className="whitespace-pre-wrap">{view.snapshot.model.summary}</dd>
                <dt className="font-semibold">Tags</dt>
                <dd>{view.snapshot.model.tags.join(", ") || "—"}</dd>
                <dt className="font-semibold">Provenance</dt>
                <dd className="whitespace-pre-wrap">{view.snapshot.model.provenance || "—"}</dd>
              </dl>
            )}
          </section>
          <section className="card p-4" aria-labelledby="compare-title">
            <h2 id="compare-title" className="font-semibold">Compared with the library</h2>
            <div className="mt-2">
              <SnapshotComparison view={view} />
            </div>
          </section>
          <section aria-labelledby="figures-title">
            <h2 id="figures-title" className="mb-2 font-semibold">Figures of the snapshot</h2>
            <FiguresSection figures={view.snapshot.figures} verification={view.snapshot.figures.verification} />
          </section>
          <section className="card p-4" aria-labelledby="params-title">
            <h2 id="params-title" className="font-semibold">Parameters of the snapshot</h2>
            <Parameters params={view.snapshot.params} figures={view.snapshot.figures} />
          </section>
          <section className="card p-4" aria-labelledby="verification-title">
            <h2 id="verification-title" className="font-semibold">Verification record</h2>
            <VerificationTable record={view.snapshot.figures.verification} />
          </section>
        </div>
        <aside className="min-w-0 space-y-4">
          <section className="card p-4" aria-labelledby="thread-title">
            <h2 id="thread-title" className="mb-2 font-semibold">Review thread</h2>
            <Thread view={view} />
            {open ? <CommentForm data={actionData} label="Reply to the curators" /> : <p className="mt-3 text-sm text-ink-soft">The thread is closed.</p>}
          </section>
          {open && (
            <section className="card p-4" aria-labelledby="withdraw-title">
              <h2 id="withdraw-title" className="font-semibold">Withdraw</h2>
              <p className="mt-1 text-sm text-ink-soft">Takes the proposal out of the queue. The workspace item stays; you can submit it again later.</p>
              <Form method="post" className="mt-2" preventScrollReset>
                <input type="hidden" name="intent" value="withdraw" />
                <label htmlFor="withdraw-note" className="block text-sm font-semibold">Reason (optional)</label>
                <textarea id="withdraw-note" name="note" className="field mt-1 h-16 text-sm" maxLength={NOTE_MAX} />
                <Refusal data={actionData} intent="withdraw" />
                <button type="submit" className="btn btn-quiet mt-2" disabled={busy("withdraw")}>
                  Withdraw the proposal
                </button>
              </Form>
            </section>
          )}
        </aside>
      </div>
    </div>
  );
}
