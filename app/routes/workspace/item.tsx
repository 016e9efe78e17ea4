import { useEffect, useMemo, useRef, useState } from "react";
import { data, Form, Link, redirect, useFetcher, useRevalidator } from "react-router";
import { z } from "zod";
import { requireContributor } from "~/.server/auth.server";
import { openProposalOfItem } from "~/.server/proposals.server";
import { proposalStateLabels } from "~/proposal-forms";
import {
  deleteWorkspaceItem,
  getWorkspaceItem,
  restoreWorkspaceRevision,
  saveWorkspaceItem,
  type SavedFigures,
} from "~/.server/workspace.server";
import { NOTES_MAX, TITLE_MAX } from "~/workspace-limits";
import { draftFromParams, paramsFromDraft, stateCount, type Draft } from "~/components/editors/draft";
import { issuesByPath } from "~/components/editors/grid-ops";
import { ModelEditor } from "~/components/editors/model-editor";
import { PREVIEW_LOCAL_LIMIT, PreviewPanel, PreviewStrip, SweepChart, usePreview } from "~/components/editors/preview";
import { parseModel, type InputIssue } from "~/engine";
import { familyLabels } from "~/families";
import { fromBits, unitLabel, useUnits } from "~/units";
import stylesheet from "~/styles/workspace.css?url";
import type { Route } from "./+types/item";

export const links: Route.LinksFunction = () => [{ rel: "stylesheet", href: stylesheet }];

export const meta: Route.MetaFunction = ({ data: d }) => [{ title: `${d?.item.title ?? "Item"} · Workspace · Ergoshelf` }];

function notFound(): never {
  throw data({ message: "There is no such item in your workspace." }, { status: 404 });
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireContributor(request);
  const item = await getWorkspaceItem(user.id, params.id);
  if (!item) notFound();
  return { item, openProposal: await openProposalOfItem(item.id) };
}

const revisionField = z
  .string({ error: "revision is missing" })
  .regex(/^[1-9][0-9]{0,9}$/, "revision must be a whole number from 1")
  .transform(Number);

const saveSchema = z.object({
  intent: z.literal("save"),
  revision: revisionField,
  title: z.string({ error: "a title is needed" }).trim().min(1, "a title is needed").max(TITLE_MAX, `a title has at most ${TITLE_MAX} characters`),
  notes: z.string().max(NOTES_MAX, `notes have at most ${NOTES_MAX} characters`).default(""),
  params: z.string({ error: "params is missing" }),
});
const restoreSchema = z.object({ intent: z.literal("restore"), revision: revisionField, from: revisionField });
const deleteSchema = z.object({ intent: z.literal("delete"), confirm: z.literal("yes", { error: "tick the confirmation to delete this item" }) });

export type ItemActionData =
  | { ok: true; intent: "save" | "restore"; revision: number; figures?: SavedFigures }
  | { ok: false; intent: string; status: number; message: string; issues: InputIssue[]; currentRevision?: number };

function refused(intent: string, status: number, message: string, issues: InputIssue[] = [], currentRevision?: number) {
  return data<ItemActionData>({ ok: false, intent, status, message, issues, currentRevision }, { status });
}

function firstIssues(err: z.ZodError): InputIssue[] {
  return err.issues.map((i) => ({ path: i.path.map(String).join(".") || "form", message: i.message }));
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireContributor(request);
  const form = Object.fromEntries(await request.formData());
  const intent = String(form.intent ?? "");
  if (intent === "save") {
    const parsed = saveSchema.safeParse(form);
    if (!parsed.success) {
      const issues = firstIssues(parsed.error);
      return refused(intent, 400, issues[0].message, issues);
    }
    let model: unknown;
    try {
      model = JSON.parse(parsed.data.params);
    } catch {
      return refused(intent, 400, "params is not valid JSON", [{ path: "params", message: "params is not valid JSON" }]);
    }
    const r = await saveWorkspaceItem(user.id, params.id, { baseRevision: parsed.data.revision, title: parsed.data.title, notes: parsed.data.notes, params: model });
    if (!r.ok) {
      if (r.kind === "not-found") notFound();
      return refused(intent, r.status, r.message, r.kind === "invalid" ? r.issues : [], r.kind === "stale" ? r.currentRevision : undefined);
    }
    return data<ItemActionData>({ ok: true, intent, revision: r.value.revision, figures: r.value.figures });
  }
  if (intent === "restore") {
    const parsed = restoreSchema.safeParse(form);
    if (!parsed.success) return refused(intent, 400, parsed.error.issues[0].message, firstIssues(parsed.error));
    const r = await restoreWorkspaceRevision(user.id, params.id, { from: parsed.data.from, baseRevision: parsed.data.revision });
    if (!r.ok) {
      if (r.kind === "not-found") notFound();
      return refused(intent, r.status, r.message, r.kind === "invalid" ? r.issues : [], r.kind === "stale" ? r.currentRevision : undefined);
    }
    return data<ItemActionData>({ ok: true, intent, revision: r.value.revision });
  }
  if (intent === "delete") {
    const parsed = deleteSchema.safeParse(form);
    if (!parsed.success) return refused(intent, 400, parsed.error.issues[0].message, firstIssues(parsed.error));
    if (!(await deleteWorkspaceItem(user.id, params.id))) notFound();
    return redirect("/workspace");
  }
  return refused(intent, 400, 'intent must be "save", "restore" or "delete"', [{ path: "intent", message: 'intent must be "save", "restore" or "delete"' }]);
}

function when(d: Date | string): string {
  return new Date(d).toISOString().slice(0, 16).replace("T", " ") + " UTC";
}

/** The server's verified figures for the revision just saved. */
function SavedFiguresNote({ revision, figures }: { revision: number; figures: SavedFigures }) {
  const { unit } = useUnits();
  const u = unitLabel(unit);
  const fmt = (bits: number | null) => {
    const v = fromBits(bits, unit);
    return v === null ? "—" : v.toFixed(6);
  };
  if (!figures.ok) {
    return (
      <p className="mt-2 rounded border border-warn/40 bg-warn/5 p-2 text-sm" data-testid="saved-figures">
        <span aria-hidden="true">⚠ </span>Saved as revision {revision}, but the server could not compute its figures: {figures.message}
      </p>
    );
  }
  return (
    <p className="mt-2 rounded border border-rule bg-paper-deep/40 p-2 text-sm" data-testid="saved-figures">
      <span className="font-semibold">Server figures for revision {revision}:</span>{" "}
      <span className="figures font-mono">
        entropy rate {fmt(figures.entropyRateBits)}
        {figures.minEntropyRateBits !== null && <>, min-entropy rate {fmt(figures.minEntropyRateBits)}</>} {u}
      </span>
      {" · "}
      {figures.verified ? (
        <span className="text-ok">
          <span aria-hidden="true">✓ </span>verified by two routes ({figures.checks} checks)
        </span>
      ) : (
        <span className="font-semibold text-bad">
          <span aria-hidden="true">✕ </span>verification failed for {figures.failedChecks.join(", ") || "the record"}; it could not be published as it is
        </span>
      )}
      {figures.message && <span className="mt-1 block text-ink-soft">{figures.message}</span>}
    </p>
  );
}

export default function WorkspaceItemPage({ loaderData, actionData }: Route.ComponentProps) {
  const { item, openProposal } = loaderData;
  const save = useFetcher<ItemActionData>({ key: `save-${item.id}` });
  const restore = useFetcher<ItemActionData>();
  const revalidator = useRevalidator();
  const [draft, setDraft] = useState<Draft>(() => draftFromParams(item.params));
  const [title, setTitle] = useState(item.title);
  const [notes, setNotes] = useState(item.notes);
  // The revision the form's contents are based on; a save names it, and the server refuses it if stale.
  const [baseRevision, setBaseRevision] = useState(item.revision);
  const [dirty, setDirty] = useState(false);
  const [confirmDelete, setConfirmDelete] = useState(false);
  // Edits made since the last submit, so a save that returns while the user types keeps them marked unsaved.
  const edits = useRef(0);
  const editsAtSubmit = useRef(0);

  const loadSaved = () => {
    setDraft(draftFromParams(item.params));
    setTitle(item.title);
    setNotes(item.notes);
    setBaseRevision(item.revision);
    setDirty(false);
  };

  // A new revision in the loader. Ours (a save or a restore from this page) becomes the base; one saved
  // elsewhere replaces an untouched form, but never the user's unsaved edits (those get the stale notice).
  useEffect(() => {
    if (item.revision === baseRevision) return;
    if (restore.data?.ok && restore.data.revision === item.revision) {
      loadSaved();
    } else if (save.data?.ok && save.data.revision === item.revision) {
      setBaseRevision(item.revision);
      setDirty(edits.current !== editsAtSubmit.current);
    } else if (!dirty) {
      loadSaved();
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [item.revision]);

  // A refused save does not reload the page's data; fetch it, so the header, the history and the
  // submit box show the newer revision (the effect above keeps the user's edits, which are dirty).
  useEffect(() => {
    if (save.state === "idle" && save.data && !save.data.ok && save.data.status === 409) revalidator.revalidate();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [save.data, save.state]);

  const model = useMemo(() => paramsFromDraft(draft), [draft]);
  const check = useMemo(() => parseModel(model), [model]);
  const local = item.family !== "hidden" && stateCount(draft) <= PREVIEW_LOCAL_LIMIT;
  const preview = usePreview(model, local);

  // A save posted without JavaScript comes back as the page's action data instead of the fetcher's.
  const fromDocument = !save.data && actionData?.intent === "save";
  const saveResult = save.data ?? (fromDocument ? actionData : undefined);
  const refusedSave = saveResult && !saveResult.ok ? saveResult : null;
  const serverIssues = refusedSave && !dirty ? refusedSave.issues : [];
  const issues = useMemo(
    () => issuesByPath([...(check.ok ? [] : check.error.issues), ...serverIssues.filter((i) => i.path !== "form" && i.path !== "title")]),
    [check, serverIssues],
  );
  const titleIssue = serverIssues.find((i) => i.path === "title")?.message;
  // Stale: the server refused our base revision, or the loader already shows a newer one.
  const newerRevision = Math.max(item.revision, refusedSave?.status === 409 ? (refusedSave.currentRevision ?? 0) : 0);
  const stale = newerRevision > baseRevision;
  const markEdited = () => {
    edits.current += 1;
    setDirty(true);
  };
  const update = (d: Draft) => {
    setDraft(d);
    markEdited();
  };
  const saving = save.state !== "idle";
  const nextRevision = (stale ? newerRevision : baseRevision) + 1;

  /** Drops the form's edits for the newer revision; a refused save does not reload the page's data, so fetch it first. */
  const discardForNewer = () => {
    if (item.revision >= newerRevision) return loadSaved();
    setDirty(false);
    revalidator.revalidate(); // the effect above adopts the newer revision into the untouched form
  };

  /** Saves the form's contents on top of the newer revision (which stays in the history). */
  const saveOnTop = () => {
    editsAtSubmit.current = edits.current;
    setBaseRevision(newerRevision);
    save.submit({ intent: "save", revision: String(newerRevision), title, notes, params: JSON.stringify(model) }, { method: "post" });
  };

  return (
    <div className={`ws-page ws-page--strip`}>
      <p className="eyebrow">
        <Link to="/workspace">Workspace</Link> · {familyLabels[item.family]}
      </p>
      <div className="mt-1 flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <h1 className="text-2xl font-bold break-words">{item.title}</h1>
        <span className="figures font-mono text-sm text-ink-soft" data-testid="revision">
          revision {item.revision}
        </span>
      </div>
      <p className="mt-1 text-sm text-ink-soft" data-testid="item-source">
        {item.sourceModel ? (
          <>
            Cloned from <Link to={item.sourceModel.path}>{item.sourceModel.title}</Link>, <Link to={item.sourcePath!}>edition {item.sourceModel.edition}</Link>{" "}
            (<code className="font-mono text-xs">{item.source}</code>). Editing here never changes the library.
          </>
        ) : (
          <>Started in the workspace (not cloned from a library edition).</>
        )}
      </p>

      <save.Form
        method="post"
        className="mt-4"
        onSubmit={() => {
          editsAtSubmit.current = edits.current;
        }}
      >
        <input type="hidden" name="intent" value="save" />
        <input type="hidden" name="revision" value={baseRevision} />
        <input type="hidden" name="params" value={JSON.stringify(model)} />
        <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_24rem]">
          <div className="min-w-0 space-y-4">
            <section className="card p-4" aria-labelledby="about-title">
              <h2 id="about-title" className="sr-only">Title and notes</h2>
              <label htmlFor="item-title" className="block text-sm font-semibold">Title</label>
              <input
                id="item-title"
                name="title"
                className="field mt-1"
                value={title}
                maxLength={TITLE_MAX}
                onChange={(e) => {
                  setTitle(e.target.value);
                  markEdited();
                }}
                aria-invalid={titleIssue ? true : undefined}
                aria-describedby={titleIssue ? "item-title-error" : undefined}
              />
              {titleIssue && (
                <p id="item-title-error" className="mt-1 text-sm text-bad">
                  <span aria-hidden="true">✕ </span>
                  {titleIssue}
                </p>
              )}
              <label htmlFor="item-notes" className="mt-3 block text-sm font-semibold">Notes</label>
              <textarea
                id="item-notes"
                name="notes"
                className="field mt-1 h-20 text-sm"
                value={notes}
                maxLength={NOTES_MAX}
                aria-describedby="item-notes-help"
                onChange={(e) => {
                  setNotes(e.target.value);
                  markEdited();
                }}
              />
              <p id="item-notes-help" className="mt-1 text-xs text-ink-soft">
                Where the parameters come from and what you changed; they go with a proposal to the curators.
              </p>
            </section>
            <section className="card p-4" aria-labelledby="params-title">
              <h2 id="params-title" className="font-semibold">Parameters</h2>
              <ModelEditor draft={draft} onChange={update} issues={issues} />
            </section>
            <div className="flex flex-wrap items-center gap-3">
              <button type="submit" className="btn btn-primary disabled:cursor-not-allowed disabled:opacity-45" disabled={saving || stale}>
                {saving ? "Saving…" : `Save as revision ${baseRevision + 1}`}
              </button>
              {dirty && !saving && !stale && (
                <button type="button" className="btn btn-quiet" onClick={loadSaved}>
                  Discard changes
                </button>
              )}
              <span className="text-sm text-ink-soft" role="status" data-testid="save-status">
                {saving ? "" : dirty ? "Unsaved changes." : saveResult?.ok ? `Saved as revision ${saveResult.revision}.` : ""}
              </span>
            </div>
            {saveResult?.ok && saveResult.figures && !dirty && <SavedFiguresNote revision={saveResult.revision} figures={saveResult.figures} />}
            {stale ? (
              <div className="rounded border border-warn/50 bg-warn/5 p-3 text-sm" role="alert" data-testid="stale-notice">
                <p className="font-semibold">
                  <span aria-hidden="true">⚠ </span>
                  {refusedSave?.status === 409 ? "Not saved: " : ""}this item was saved elsewhere (revision {newerRevision}) after you opened revision {baseRevision}.
                </p>
                <p className="mt-1">
                  Nothing was overwritten, and your edits are still in this form. Save them on top of revision {newerRevision} (it stays in the history and can be
                  restored), or discard them and load revision {newerRevision}.
                </p>
                <div className="mt-2 flex flex-wrap gap-2">
                  <button type="button" className="btn btn-primary" onClick={saveOnTop} disabled={saving}>
                    Save mine as revision {nextRevision}
                  </button>
                  <button type="button" className="btn btn-quiet" onClick={discardForNewer}>
                    Discard mine, load revision {newerRevision}
                  </button>
                </div>
                <details className="mt-2">
                  <summary className="cursor-pointer">Your unsaved parameters as JSON (to copy)</summary>
                  <textarea readOnly aria-label="Your unsaved parameters as JSON" className="field mt-1 h-32 font-mono text-xs" value={JSON.stringify(model, null, 2)} />
                </details>
              </div>
            ) : (
              refusedSave &&
              (refusedSave.status !== 409 || fromDocument) && (
                <div className="rounded border border-bad/40 bg-bad/5 p-3 text-sm text-bad" role="alert">
                  <p className="font-semibold">
                    <span aria-hidden="true">✕ </span>Not saved:{" "}
                    {refusedSave.status === 409
                      ? "this item was saved elsewhere first."
                      : serverIssues.some((i) => i.path === "title")
                        ? "the title needs attention."
                        : "the parameters have problems (marked above)."}
                  </p>
                  <p className="mt-1">{refusedSave.message}</p>
                </div>
              )
            )}
          </div>
          <div className="min-w-0 space-y-4">
            <PreviewPanel preview={preview} stale={dirty} remote={!local} />
            <SweepChart model={model} valid={check.ok} family={item.family} local={local} />
          </div>
        </div>
      </save.Form>

      <div className="mt-6 grid gap-6 lg:grid-cols-3">
        <section className="card p-4" aria-labelledby="submit-title">
          <h2 id="submit-title" className="font-semibold">Submit for review</h2>
          <p className="mt-1 text-sm text-ink-soft">
            Send the saved revision {item.revision} to the curators {item.sourceModel ? `as a new edition of ${item.sourceModel.title} or ` : ""}as a new model. The
            proposal keeps a frozen copy; you can go on editing here.
          </p>
          {dirty && <p className="mt-2 text-sm text-warn"><span aria-hidden="true">⚠ </span>Your unsaved changes are not part of revision {item.revision}: save them first.</p>}
          {openProposal ? (
            <p className="mt-2 text-sm" data-testid="open-proposal">
              This item has an open proposal ({proposalStateLabels[openProposal.state].toLowerCase()}).{" "}
              <Link to={`/workspace/proposals/${openProposal.id}`} className="font-semibold">
                Open the proposal
              </Link>
              {openProposal.state === "changes-requested" ? " to resubmit this revision." : "."}
            </p>
          ) : (
            <Link to={`/workspace/${item.id}/submit`} className="btn btn-primary mt-3" data-testid="submit-for-review">
              Submit for review
            </Link>
          )}
        </section>
        <section className="card p-4" aria-labelledby="history-title">
          <h2 id="history-title" className="font-semibold">Revision history</h2>
          {restore.data && !restore.data.ok && (
            <p className="mt-2 text-sm text-bad" role="alert">
              <span aria-hidden="true">✕ </span>
              {restore.data.message}
            </p>
          )}
          {dirty && (
            <p className="mt-2 text-sm text-ink-soft">Save or discard your unsaved changes before restoring an older revision.</p>
          )}
          <ol className="mt-2 divide-y divide-rule text-sm">
            {item.revisions.map((r) => (
              <li key={r.revision} className="flex flex-wrap items-center justify-between gap-2 py-2" data-testid={`revision-${r.revision}`}>
                <span className="min-w-0">
                  <span className="figures font-mono font-semibold">r{r.revision}</span> · {r.title}{" "}
                  <span className="figures font-mono text-xs whitespace-nowrap text-ink-soft">{when(r.createdAt)}</span>
                  {r.revision === item.revision && <span className="ml-1 text-xs font-semibold text-ok">(current)</span>}
                </span>
                {r.revision !== item.revision && (
                  <restore.Form method="post">
                    <input type="hidden" name="intent" value="restore" />
                    <input type="hidden" name="revision" value={item.revision} />
                    <input type="hidden" name="from" value={r.revision} />
                    <button type="submit" className="btn btn-quiet px-2 py-1 text-xs" aria-label={`Restore revision ${r.revision}`} disabled={restore.state !== "idle" || dirty}>
                      Restore
                    </button>
                  </restore.Form>
                )}
              </li>
            ))}
          </ol>
          <p className="mt-2 text-xs text-ink-soft">Restoring copies an older revision into a new revision; nothing is overwritten.</p>
        </section>
        <section className="card p-4" aria-labelledby="delete-title">
          <h2 id="delete-title" className="font-semibold">Delete this item</h2>
          <p className="mt-1 text-sm text-ink-soft">Removes the draft and all {item.revisions.length} of its revisions. Library editions are not affected.</p>
          {confirmDelete ? (
            <Form method="post" className="mt-3 space-y-2">
              <input type="hidden" name="intent" value="delete" />
              <label className="flex items-center gap-2 text-sm">
                <input type="checkbox" name="confirm" value="yes" required /> Yes, delete “{item.title}” for good
              </label>
              <div className="flex gap-2">
                <button type="submit" className="btn border-bad bg-bad text-white hover:bg-bad/90">Delete item</button>
                <button type="button" className="btn btn-quiet" onClick={() => setConfirmDelete(false)}>Keep it</button>
              </div>
            </Form>
          ) : (
            <button type="button" className="btn btn-quiet mt-3" onClick={() => setConfirmDelete(true)}>
              Delete…
            </button>
          )}
        </section>
      </div>
      <PreviewStrip preview={preview} />
    </div>
  );
}
