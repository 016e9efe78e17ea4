import { useEffect, useMemo, useState } from "react";
import { data, Form, Link, redirect, useFetcher } from "react-router";
import { z } from "zod";
import { requireContributor } from "~/.server/auth.server";
import {
  deleteWorkspaceItem,
  getWorkspaceItem,
  restoreWorkspaceRevision,
  saveWorkspaceItem,
} from "~/.server/workspace.server";
import { NOTES_MAX, TITLE_MAX } from "~/workspace-limits";
import { draftFromParams, paramsFromDraft, stateCount, type Draft } from "~/components/editors/draft";
import { issuesByPath } from "~/components/editors/grid-ops";
import { ModelEditor } from "~/components/editors/model-editor";
import { PREVIEW_LOCAL_LIMIT, PreviewPanel, SweepChart, usePreview } from "~/components/editors/preview";
import { parseModel, type InputIssue } from "~/engine";
import { familyLabels } from "~/families";
import type { Route } from "./+types/item";

export const meta: Route.MetaFunction = ({ data: d }) => [{ title: `${d?.item.title ?? "Item"} · Workspace · Ergoshelf` }];

function notFound(): never {
  throw data({ message: "There is no such item in your workspace." }, { status: 404 });
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireContributor(request);
  const item = await getWorkspaceItem(user.id, params.id);
  if (!item) notFound();
  return { item };
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
  | { ok: true; intent: "save" | "restore"; revision: number }
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
    return data<ItemActionData>({ ok: true, intent, revision: r.value.revision });
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

export default function WorkspaceItemPage({ loaderData }: Route.ComponentProps) {
  const { item } = loaderData;
  const save = useFetcher<ItemActionData>({ key: `save-${item.id}` });
  const restore = useFetcher<ItemActionData>();
  const [draft, setDraft] = useState<Draft>(() => draftFromParams(item.params));
  const [title, setTitle] = useState(item.title);
  const [notes, setNotes] = useState(item.notes);
  const [baseRevision, setBaseRevision] = useState(item.revision);
  const [dirty, setDirty] = useState(false);
  const [confirmDelete, setConfirmDelete] = useState(false);

  // A new revision in the loader (after a save or a restore) becomes the page's base; a restore also replaces the draft.
  useEffect(() => {
    if (item.revision === baseRevision) return;
    setBaseRevision(item.revision);
    if (restore.data?.ok && restore.data.revision === item.revision) {
      setDraft(draftFromParams(item.params));
      setTitle(item.title);
      setNotes(item.notes);
    }
    setDirty(false);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [item.revision]);

  const model = useMemo(() => paramsFromDraft(draft), [draft]);
  const check = useMemo(() => parseModel(model), [model]);
  const local = item.family !== "hidden" && stateCount(draft) <= PREVIEW_LOCAL_LIMIT;
  const preview = usePreview(model, local);

  const saveResult = save.data;
  const serverIssues = saveResult && !saveResult.ok && !dirty ? saveResult.issues : [];
  const issues = useMemo(
    () => issuesByPath([...(check.ok ? [] : check.error.issues), ...serverIssues.filter((i) => i.path !== "form")]),
    [check, serverIssues],
  );
  const titleIssue = serverIssues.find((i) => i.path === "title")?.message;
  const stale = saveResult && !saveResult.ok && saveResult.status === 409;
  const update = (d: Draft) => {
    setDraft(d);
    setDirty(true);
  };
  const saving = save.state !== "idle";

  return (
    <div>
      <p className="eyebrow">
        <Link to="/workspace">Workspace</Link> · {familyLabels[item.family]} ·{" "}
        {item.source ? (
          <>
            cloned from <Link to={item.sourcePath!} className="font-mono normal-case">{item.source}</Link>
          </>
        ) : (
          "new"
        )}
      </p>
      <div className="mt-1 flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <h1 className="text-2xl font-bold break-words">{item.title}</h1>
        <span className="figures font-mono text-sm text-ink-soft" data-testid="revision">
          revision {item.revision}
        </span>
      </div>

      <save.Form method="post" className="mt-4" onSubmit={() => setDirty(false)}>
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
                  setDirty(true);
                }}
                aria-invalid={titleIssue ? true : undefined}
                aria-describedby={titleIssue ? "item-title-error" : undefined}
              />
              {titleIssue && <p id="item-title-error" className="mt-1 text-sm text-bad">{titleIssue}</p>}
              <label htmlFor="item-notes" className="mt-3 block text-sm font-semibold">Notes</label>
              <textarea
                id="item-notes"
                name="notes"
                className="field mt-1 h-20 text-sm"
                value={notes}
                maxLength={NOTES_MAX}
                onChange={(e) => {
                  setNotes(e.target.value);
                  setDirty(true);
                }}
              />
            </section>
            <section className="card p-4" aria-labelledby="params-title">
              <h2 id="params-title" className="font-semibold">Parameters</h2>
              <ModelEditor draft={draft} onChange={update} issues={issues} />
            </section>
            <div className="flex flex-wrap items-center gap-3">
              <button type="submit" className="btn btn-primary" disabled={saving}>
                {saving ? "Saving…" : `Save as revision ${baseRevision + 1}`}
              </button>
              <span className="text-sm text-ink-soft" role="status">
                {dirty ? "Unsaved changes." : saveResult?.ok ? `Saved as revision ${saveResult.revision}.` : ""}
              </span>
            </div>
            {saveResult && !saveResult.ok && (
              <div className={`rounded border p-3 text-sm ${stale ? "border-warn/50 bg-warn/5" : "border-bad/40 bg-bad/5 text-bad"}`} role="alert">
                <p className="font-semibold">
                  <span aria-hidden="true">{stale ? "⚠ " : "✕ "}</span>
                  {stale ? "Not saved." : "Not saved: the parameters have problems."}
                </p>
                <p className="mt-1">{saveResult.message}</p>
                {stale && (
                  <details className="mt-2">
                    <summary className="cursor-pointer">Your unsaved parameters as JSON (to copy)</summary>
                    <textarea readOnly aria-label="Your unsaved parameters as JSON" className="field mt-1 h-32 font-mono text-xs" value={JSON.stringify(model, null, 2)} />
                  </details>
                )}
              </div>
            )}
          </div>
          <div className="min-w-0 space-y-4">
            <PreviewPanel state={preview} stale={dirty} />
            <SweepChart model={model} valid={check.ok && item.family !== "hidden"} />
          </div>
        </div>
      </save.Form>

      <div className="mt-6 grid gap-6 lg:grid-cols-2">
        <section className="card p-4" aria-labelledby="history-title">
          <h2 id="history-title" className="font-semibold">Revision history</h2>
          {restore.data && !restore.data.ok && (
            <p className="mt-2 text-sm text-bad" role="alert">{restore.data.message}</p>
          )}
          <ol className="mt-2 divide-y divide-rule text-sm">
            {item.revisions.map((r) => (
              <li key={r.revision} className="flex flex-wrap items-center justify-between gap-2 py-2">
                <span>
                  <span className="figures font-mono font-semibold">r{r.revision}</span> · {r.title}{" "}
                  <span className="figures font-mono text-xs text-ink-soft">{when(r.createdAt)}</span>
                  {r.revision === item.revision && <span className="ml-1 text-xs font-semibold text-ok">(current)</span>}
                </span>
                {r.revision !== item.revision && (
                  <restore.Form method="post">
                    <input type="hidden" name="intent" value="restore" />
                    <input type="hidden" name="revision" value={item.revision} />
                    <input type="hidden" name="from" value={r.revision} />
                    <button type="submit" className="btn btn-quiet px-2 py-1 text-xs" aria-label={`Restore revision ${r.revision}`} disabled={restore.state !== "idle"}>
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
    </div>
  );
}
