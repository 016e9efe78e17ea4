/**
 * The pieces of a proposal page shared by the author's view (/workspace/proposals/:id) and the
 * curators' (/review/:id): the state, the comparison with the current edition, the verification
 * record, the thread and the reply form.
 */
import { Form, Link, useNavigation } from "react-router";
import { diffFigures, diffParams, type ParamChange } from "~/components/model/diff";
import { formatDelta, formatFixed, formatSmall, formatTolerance } from "~/components/model/format";
import type { ComputeResult } from "~/engine/compute";
import type { ModelParams } from "~/engine/schema";
import type { VerificationRecord } from "~/engine/verification";
import { familyLabels } from "~/families";
import { NOTE_MAX, proposalKindLabels, proposalStateLabels, type ProposalKind, type ProposalState } from "~/proposal-forms";
import { fromBits, unitLabel, useUnits } from "~/units";

/** The serialised ProposalView a loader sends (dates become strings). */
export interface ProposalPageView {
  id: string;
  kind: ProposalKind;
  state: ProposalState;
  title: string;
  family: ModelParams["family"];
  changeNote: string;
  createdAt: string | Date;
  updatedAt: string | Date;
  author: { id: string; name: string };
  target: { slug: string; title: string } | null;
  proposedSlug: string | null;
  snapshot: {
    params: ModelParams;
    figures: ComputeResult;
    revision: number;
    model: { summary: string; tags: string[]; provenance: string } | null;
    basedOn: { slug: string; edition: number } | null;
  };
  current: { number: number; params: ModelParams; figures: ComputeResult; verification: VerificationRecord } | null;
  published: { slug: string; number: number; citationKey: string } | null;
  decidedBy: string | null;
  item: { id: string; revision: number; changedSinceSnapshot: boolean } | null;
  thread: { id: number; kind: string; body: string; authorName: string; authorIsAuthor: boolean; createdAt: string | Date }[];
}

export function when(d: Date | string): string {
  return new Date(d).toISOString().slice(0, 16).replace("T", " ") + " UTC";
}

/** Age in whole days (or hours under a day), for the queue. */
export function age(d: Date | string, now = Date.now()): string {
  const hours = Math.max(0, (now - new Date(d).getTime()) / 3.6e6);
  if (hours < 1) return "under an hour";
  if (hours < 24) return `${Math.floor(hours)} h`;
  const days = Math.floor(hours / 24);
  return days === 1 ? "1 day" : `${days} days`;
}

const stateTone: Record<ProposalState, string> = {
  submitted: "border-accent/50 bg-accent/5 text-ink",
  "changes-requested": "border-warn/60 bg-warn/10 text-ink",
  resubmitted: "border-accent/50 bg-accent/5 text-ink",
  accepted: "border-ok/50 bg-ok/10 text-ink",
  declined: "border-bad/40 bg-bad/5 text-ink",
  withdrawn: "border-rule bg-paper-deep/40 text-ink-soft",
};
const stateMark: Record<ProposalState, string> = {
  submitted: "●",
  "changes-requested": "↺",
  resubmitted: "●",
  accepted: "✓",
  declined: "✕",
  withdrawn: "–",
};

export function StateBadge({ state }: { state: ProposalState }) {
  return (
    <span className={`inline-flex items-center gap-1 rounded-full border px-2 py-0.5 text-xs font-semibold whitespace-nowrap ${stateTone[state]}`} data-testid="proposal-state">
      <span aria-hidden="true">{stateMark[state]}</span>
      {proposalStateLabels[state]}
    </span>
  );
}

/** Title, state and what the proposal is for. */
export function ProposalHeading({ view, eyebrow }: { view: ProposalPageView; eyebrow: React.ReactNode }) {
  const slug = view.target?.slug ?? view.proposedSlug;
  return (
    <header>
      <p className="eyebrow">{eyebrow}</p>
      <div className="mt-1 flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-bold break-words">{view.title}</h1>
        <StateBadge state={view.state} />
      </div>
      <p className="mt-1 text-sm text-ink-soft">
        {proposalKindLabels[view.kind]} · {familyLabels[view.family]} ·{" "}
        {view.kind === "new-edition" && view.target ? (
          <>
            for <Link to={`/library/${view.target.slug}`}>{view.target.title}</Link>
            {view.current && <> (current edition {view.current.number})</>}
          </>
        ) : (
          <>
            asks for the slug <code className="font-mono">{slug}</code>
          </>
        )}{" "}
        · by {view.author.name} · submitted {when(view.createdAt)} · snapshot of revision {view.snapshot.revision}
      </p>
      {view.published && (
        <p className="mt-3 rounded border border-ok/50 bg-ok/10 p-3 text-sm" data-testid="published-notice">
          <span aria-hidden="true">✓ </span>Published as{" "}
          <Link to={`/library/${view.published.slug}/e/${view.published.number}`} className="font-semibold">
            edition {view.published.number}
          </Link>{" "}
          — cite it as <code className="font-mono">{view.published.citationKey}</code>
          {view.decidedBy && <> · accepted by {view.decidedBy}</>}.
        </p>
      )}
    </header>
  );
}

function paramName(c: ParamChange): string {
  if (c.table === "scalar") return c.row;
  if (c.table === "edges") return `edge ${c.row}`;
  if (c.table === "p") return `p(${c.row})`;
  return `${c.table}[${c.row} → ${c.col}]`;
}

/** Parameter-by-parameter and figure-by-figure comparison of the snapshot with the current edition. */
export function SnapshotComparison({ view }: { view: ProposalPageView }) {
  const { unit } = useUnits();
  const u = unitLabel(unit);
  const { current, snapshot } = view;
  if (!current) {
    return (
      <p className="text-sm text-ink-soft">
        {view.kind === "new-model" ? "A new model: there is no current edition to compare with. Its parameters and figures are below." : "The model's current edition could not be found."}
      </p>
    );
  }
  const params = diffParams(current.params, snapshot.params);
  const figures = diffFigures(current.figures, snapshot.figures);
  const rate = (bits: number | null) => {
    const v = fromBits(bits, unit);
    return v === null ? "—" : formatFixed(v, 9);
  };
  const show = (kind: "rate" | "probability", x: number | null) => (kind === "rate" ? rate(x) : x === null ? "—" : formatFixed(x, 9));
  const changedFigures = figures.filter((f) => f.changed);
  return (
    <div className="space-y-4">
      <div>
        <h3 className="text-base font-bold">Parameters: edition {current.number} → this proposal</h3>
        {params.structure.map((s) => (
          <p key={s} className="text-sm">
            Structure: {s}.
          </p>
        ))}
        {params.changes.length === 0 ? (
          <p className="text-sm">No parameter changed ({params.unchanged} compared).</p>
        ) : (
          <>
            <p className="text-sm text-ink-soft">
              {params.changes.length} of {params.changes.length + params.unchanged} parameters differ.
            </p>
            <div className="mp-scroll mp-scroll-short card mt-2" tabIndex={0} role="region" aria-label="Changed parameters (scrolls)">
              <table className="mp-table figures text-xs" data-testid="proposal-param-changes">
                <caption className="sr-only">Changed parameters</caption>
                <thead>
                  <tr>
                    <th scope="col">Parameter</th>
                    <th scope="col">Edition {current.number}</th>
                    <th scope="col">Proposed</th>
                    <th scope="col">Change</th>
                  </tr>
                </thead>
                <tbody>
                  {params.changes.map((c) => (
                    <tr key={c.key}>
                      <th scope="row" className="font-sans">
                        {paramName(c)}
                        {c.kind !== "changed" && <span className="ml-1 text-ink-soft">({c.kind})</span>}
                      </th>
                      <td className="font-mono">{c.from === null ? "—" : String(c.from)}</td>
                      <td className="font-mono font-semibold">{c.to === null ? "—" : String(c.to)}</td>
                      <td className="font-mono">{formatDelta(c.delta, 6)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </>
        )}
      </div>
      <div>
        <h3 className="text-base font-bold">Figures: edition {current.number} → this proposal</h3>
        <p className="text-xs text-ink-soft">
          Rates in {u}; stationary probabilities unitless. {changedFigures.length} of {figures.length} figures changed.
        </p>
        <div className="mp-scroll mp-scroll-short card mt-2" tabIndex={0} role="region" aria-label="Figure changes (scrolls)">
          <table className="mp-table font-mono figures text-xs" data-testid="proposal-figure-changes">
            <caption className="sr-only">Figures of the current edition and of the proposal</caption>
            <thead>
              <tr>
                <th scope="col" className="font-sans">
                  Figure
                </th>
                <th scope="col">Edition {current.number}</th>
                <th scope="col">Proposed</th>
                <th scope="col">Change</th>
              </tr>
            </thead>
            <tbody>
              {figures.map((f) => (
                <tr key={f.key} className={f.changed ? "" : "text-ink-soft"}>
                  <th scope="row" className="font-sans">
                    <span aria-hidden="true">{f.changed ? "◆ " : "= "}</span>
                    {f.figure}
                  </th>
                  <td>{show(f.kind, f.from)}</td>
                  <td className={f.changed ? "font-semibold" : ""}>{show(f.kind, f.to)}</td>
                  <td>{f.delta === null ? "—" : formatDelta(f.kind === "rate" ? fromBits(f.delta, unit) : f.delta, 9)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </div>
    </div>
  );
}

const relationWords = { equal: "|route 1 − route 2|", within: "outside route 2's interval by", "at most": "route 1 above route 2 by", overlap: "gap between the intervals" } as const;

/** Every check of the snapshot's verification record, both routes' values side by side. */
export function VerificationTable({ record }: { record: VerificationRecord }) {
  return (
    <div>
      <p className={`text-sm font-semibold ${record.passed ? "text-ok" : "text-bad"}`} data-testid="verification-summary">
        <span aria-hidden="true">{record.passed ? "✓ " : "✕ "}</span>
        {record.passed
          ? `All ${record.checks.length} checks passed`
          : `${record.checks.filter((c) => !c.passed).length} of ${record.checks.length} checks failed; this cannot be published`}{" "}
        <span className="font-normal text-ink-soft">(engine {record.engineVersion}; recomputed again on acceptance)</span>
      </p>
      <div className="mp-scroll mp-scroll-short card mt-2" tabIndex={0} role="region" aria-label="Verification record (scrolls)">
        <table className="mp-table figures text-xs" data-testid="verification-record">
          <caption className="sr-only">Verification record: each figure by two independent routes</caption>
          <thead>
            <tr>
              <th scope="col">Figure</th>
              <th scope="col">Two routes</th>
              <th scope="col">Difference</th>
              <th scope="col">Tolerance</th>
              <th scope="col">Result</th>
            </tr>
          </thead>
          <tbody>
            {record.checks.map((c, i) => (
              <tr key={i}>
                <th scope="row">
                  <code>{c.figure}</code>
                </th>
                <td className="mp-left min-w-[18rem]" style={{ whiteSpace: "normal" }}>
                  {c.routes.map((r, k) => (
                    <span key={k} className="block">
                      <span className="text-ink-soft">
                        {k + 1}. {r.method}:
                      </span>{" "}
                      <span className="font-mono break-all">{k === 1 && c.interval ? `[${String(c.interval[0])}, ${String(c.interval[1])}]` : String(r.value)}</span>
                    </span>
                  ))}
                </td>
                <td className="font-mono" title={relationWords[c.relation]}>
                  {formatSmall(c.difference)}
                </td>
                <td className="font-mono">{formatTolerance(c.tolerance)}</td>
                <td className={`font-semibold ${c.passed ? "text-ok" : "text-bad"}`}>{c.passed ? "✓ pass" : "✕ fail"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

const entryWords: Record<string, string> = {
  submitted: "submitted",
  resubmitted: "resubmitted",
  "changes-requested": "asked for changes",
  accepted: "accepted and published",
  declined: "declined",
  withdrawn: "withdrew the proposal",
  comment: "commented",
};

/** The review thread, oldest first: submissions, comments and decisions with their notes. */
export function Thread({ view }: { view: ProposalPageView }) {
  return (
    <ol className="space-y-3" data-testid="thread">
      {view.thread.map((t) => (
        <li key={t.id} className={`rounded border p-3 ${t.kind === "comment" ? "border-rule" : "border-rule bg-paper-deep/40"}`}>
          <p className="text-sm">
            <span className="font-semibold">{t.authorName}</span>
            <span className="text-ink-soft">{t.authorIsAuthor ? " (author)" : " (curator)"}</span> {entryWords[t.kind] ?? t.kind}
            <span className="figures ml-2 font-mono text-xs text-ink-soft">{when(t.createdAt)}</span>
          </p>
          {t.body && <p className="mt-1 text-sm whitespace-pre-wrap break-words">{t.body}</p>}
        </li>
      ))}
    </ol>
  );
}

export interface ActionMessage {
  intent: string;
  message: string;
  issues: { path: string; message: string }[];
}

/** A form's refusal, shown beside the form that caused it. */
export function Refusal({ data, intent }: { data: ActionMessage | undefined; intent: string }) {
  if (!data || data.intent !== intent) return null;
  return (
    <p className="mt-2 rounded border border-bad/40 bg-bad/5 p-2 text-sm text-bad" role="alert">
      <span aria-hidden="true">✕ </span>
      {data.message}
    </p>
  );
}

/** Reply in the thread. */
export function CommentForm({ data, label = "Add a comment" }: { data: ActionMessage | undefined; label?: string }) {
  const navigation = useNavigation();
  const busy = navigation.state === "submitting" && navigation.formData?.get("intent") === "comment";
  return (
    <Form method="post" className="mt-3" preventScrollReset>
      <input type="hidden" name="intent" value="comment" />
      <label htmlFor="comment-body" className="block text-sm font-semibold">
        {label}
      </label>
      <textarea id="comment-body" name="body" className="field mt-1 h-20 text-sm" maxLength={NOTE_MAX} required />
      <Refusal data={data} intent="comment" />
      <button type="submit" className="btn btn-quiet mt-2" disabled={busy}>
        {busy ? "Posting…" : "Post comment"}
      </button>
    </Form>
  );
}
