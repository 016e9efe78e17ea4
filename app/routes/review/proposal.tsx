import { data, Form, Link, redirect, useNavigation } from "react-router";
import { requireCurator } from "~/.server/auth.server";
import { commentOnProposal, decideProposal, getProposalForReview } from "~/.server/proposals.server";
import { FiguresSection } from "~/components/model/figures-section";
import { Parameters } from "~/components/model/parameters";
import {
  CommentForm,
  ProposalHeading,
  Refusal,
  SnapshotComparison,
  Thread,
  VerificationTable,
  type ActionMessage,
} from "~/components/review/proposal-parts";
import { commentFormSchema, decisionFormSchema, decisionLabels, formIssues, NOTE_MAX, openProposalStates, type Decision } from "~/proposal-forms";
import stylesheet from "~/styles/model-page.css?url";
import type { Route } from "./+types/proposal";

export const links: Route.LinksFunction = () => [{ rel: "stylesheet", href: stylesheet }];

export const meta: Route.MetaFunction = ({ data: d }) => [{ title: `${d?.view.title ?? "Proposal"} · Review · Ergoshelf` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireCurator(request);
  const view = await getProposalForReview(params.id);
  if (!view) throw data({ message: "There is no such proposal." }, { status: 404 });
  return { view, isAuthor: view.author.id === user.id };
}

function refused(intent: string, status: number, message: string, issues: ActionMessage["issues"] = []) {
  return data<ActionMessage>({ intent, message, issues }, { status });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireCurator(request);
  const form = Object.fromEntries(await request.formData());
  const intent = String(form.intent ?? "");
  if (intent === "comment") {
    const parsed = commentFormSchema.safeParse(form);
    if (!parsed.success) return refused(intent, 400, `Not posted: ${formIssues(parsed.error)[0].message}.`, formIssues(parsed.error));
    const outcome = await commentOnProposal(user, params.id, parsed.data.body);
    if (!outcome.ok) {
      if (outcome.status === 404) throw data({ message: outcome.message }, { status: 404 });
      return refused(intent, outcome.status, outcome.message, outcome.issues);
    }
    return redirect(`/review/${params.id}`);
  }
  if (intent === "decide") {
    const parsed = decisionFormSchema.safeParse(form);
    if (!parsed.success) return refused(intent, 400, `No decision recorded: ${formIssues(parsed.error)[0].message}.`, formIssues(parsed.error));
    const outcome = await decideProposal(user, params.id, parsed.data.decision, parsed.data.note);
    if (!outcome.ok) {
      if (outcome.status === 404) throw data({ message: outcome.message }, { status: 404 });
      return refused(intent, outcome.status, outcome.message, outcome.issues);
    }
    return redirect(`/review/${params.id}`);
  }
  return refused(intent, 400, 'intent must be "comment" or "decide"', [{ path: "intent", message: "unknown intent" }]);
}

const decisionHelp: Record<Decision, string> = {
  accept: "Publishes the snapshot as the next edition now (figures recomputed and verified once more) and tells the author.",
  "request-changes": "Sends it back to the author with your note; they can resubmit.",
  decline: "Closes the proposal for good, with your note as the reason.",
};

export default function ReviewProposalPage({ loaderData, actionData }: Route.ComponentProps) {
  const { view, isAuthor } = loaderData;
  const navigation = useNavigation();
  const deciding = navigation.state === "submitting" && navigation.formData?.get("intent") === "decide";
  const open = openProposalStates.includes(view.state);
  const canDecide = open && view.state !== "changes-requested" && !isAuthor;
  const figures = view.snapshot.figures;
  return (
    <div className="space-y-6">
      <ProposalHeading view={view} eyebrow={<Link to="/review">Review queue</Link>} />

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
            <h2 id="compare-title" className="font-semibold">Difference from the current edition</h2>
            <div className="mt-2">
              <SnapshotComparison view={view} />
            </div>
          </section>
          <section className="card p-4" aria-labelledby="verification-title">
            <h2 id="verification-title" className="font-semibold">Verification record of the snapshot</h2>
            <VerificationTable record={figures.verification} />
          </section>
          <section aria-labelledby="figures-title">
            <h2 id="figures-title" className="mb-2 font-semibold">Figures as they would be published</h2>
            <FiguresSection figures={figures} verification={figures.verification} />
          </section>
          <section className="card p-4" aria-labelledby="params-title">
            <h2 id="params-title" className="font-semibold">Parameters of the snapshot</h2>
            <Parameters params={view.snapshot.params} figures={figures} />
          </section>
        </div>

        <aside className="min-w-0 space-y-4">
          <section className="card p-4" aria-labelledby="decide-title">
            <h2 id="decide-title" className="font-semibold">Decision</h2>
            {isAuthor && open ? (
              <p className="mt-1 text-sm" data-testid="own-proposal">
                You wrote this proposal, so another curator must decide on it. You can still take part in the thread.
              </p>
            ) : view.state === "changes-requested" ? (
              <p className="mt-1 text-sm text-ink-soft">Waiting for the author to resubmit.</p>
            ) : !open ? (
              <p className="mt-1 text-sm text-ink-soft">Decided: this proposal is {view.state}{view.decidedBy ? ` (${view.decidedBy})` : ""}.</p>
            ) : null}
            {canDecide && (
              <Form method="post" className="mt-2 space-y-3" preventScrollReset data-testid="decision-form">
                <input type="hidden" name="intent" value="decide" />
                <fieldset>
                  <legend className="sr-only">Decision</legend>
                  {(Object.keys(decisionLabels) as Decision[]).map((d) => (
                    <label key={d} className="mt-2 flex gap-2 text-sm">
                      <input type="radio" name="decision" value={d} required />
                      <span>
                        <span className="font-semibold">{decisionLabels[d]}</span>
                        <span className="block text-xs text-ink-soft">{decisionHelp[d]}</span>
                      </span>
                    </label>
                  ))}
                </fieldset>
                <div>
                  <label htmlFor="decision-note" className="block text-sm font-semibold">Note for the author</label>
                  <textarea id="decision-note" name="note" className="field mt-1 h-24 text-sm" maxLength={NOTE_MAX} required aria-describedby="decision-note-help" />
                  <p id="decision-note-help" className="mt-1 text-xs text-ink-soft">Required for every decision; it goes into the thread and the e-mail.</p>
                </div>
                <Refusal data={actionData} intent="decide" />
                <button type="submit" className="btn btn-primary" disabled={deciding}>
                  {deciding ? "Recording…" : "Record decision"}
                </button>
              </Form>
            )}
          </section>
          <section className="card p-4" aria-labelledby="thread-title">
            <h2 id="thread-title" className="mb-2 font-semibold">Review thread</h2>
            <Thread view={view} />
            {open ? <CommentForm data={actionData} /> : <p className="mt-3 text-sm text-ink-soft">The thread is closed.</p>}
          </section>
        </aside>
      </div>
    </div>
  );
}
