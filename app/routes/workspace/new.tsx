import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import { requireContributor } from "~/.server/auth.server";
import { cloneEditionToWorkspace, createWorkspaceItem, findEditionToClone } from "~/.server/workspace.server";
import { TITLE_MAX } from "~/workspace-limits";
import { FAMILIES } from "~/engine";
import { familyLabels } from "~/families";
import type { Route } from "./+types/new";

export const meta: Route.MetaFunction = () => [{ title: "New workspace item · Ergoshelf" }];

const slugSchema = z.string({ error: "slug is missing" }).trim().min(1, "slug is missing").max(200, "slug is too long");
const editionSchema = z
  .string()
  .trim()
  .regex(/^[1-9][0-9]{0,9}$/, "edition must be a whole number from 1")
  .transform(Number)
  .optional();

const createSchema = z.object({
  intent: z.literal("create"),
  family: z.enum(FAMILIES, { error: `family must be one of ${FAMILIES.join(", ")}` }),
  title: z.string({ error: "a title is needed" }).trim().min(1, "a title is needed").max(TITLE_MAX, `a title has at most ${TITLE_MAX} characters`),
});
const cloneSchema = z.object({
  intent: z.literal("clone"),
  slug: slugSchema,
  edition: editionSchema,
  title: z.string().trim().max(TITLE_MAX, `a title has at most ${TITLE_MAX} characters`).optional(),
});

type Errors = Partial<Record<"intent" | "family" | "title" | "slug" | "edition" | "form", string>>;

function fieldErrors(err: z.ZodError): Errors {
  const out: Errors = {};
  for (const i of err.issues) {
    const k = (i.path[0] ?? "form") as keyof Errors;
    out[k] ??= i.message;
  }
  return out;
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireContributor(request);
  const url = new URL(request.url);
  const slug = url.searchParams.get("slug");
  if (!slug) return { clone: null, error: null };
  const edition = editionSchema.safeParse(url.searchParams.get("edition") ?? undefined);
  if (!edition.success) return { clone: null, error: edition.error.issues[0].message };
  const found = await findEditionToClone(slug, edition.data ?? null);
  return { clone: found, error: found ? null : "no such edition" };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireContributor(request);
  const form = Object.fromEntries(await request.formData());
  if (form.intent === "clone") {
    const parsed = cloneSchema.safeParse(form);
    if (!parsed.success) return data({ errors: fieldErrors(parsed.error) }, { status: 400 });
    const id = await cloneEditionToWorkspace(user.id, parsed.data.slug, parsed.data.edition ?? null, parsed.data.title || undefined);
    if (!id) return data({ errors: { edition: "no such edition" } as Errors }, { status: 400 });
    return redirect(`/workspace/${id}`);
  }
  if (form.intent !== "create") return data({ errors: { intent: 'intent must be "create" or "clone"' } as Errors }, { status: 400 });
  const parsed = createSchema.safeParse(form);
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error) }, { status: 400 });
  const id = await createWorkspaceItem(user.id, parsed.data.family, parsed.data.title);
  return redirect(`/workspace/${id}`);
}

function Err({ id, msg }: { id: string; msg?: string | null }) {
  return msg ? (
    <p id={id} className="mt-1 text-sm text-bad">
      <span aria-hidden="true">✕ </span>
      {msg}
    </p>
  ) : null;
}

export default function NewItem({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Errors = actionData?.errors ?? {};
  const busy = useNavigation().state === "submitting";
  const { clone, error } = loaderData;
  return (
    <div className="mx-auto max-w-xl">
      <p className="eyebrow">Workspace</p>
      {clone ? (
        <>
          <h1 className="mt-1 text-2xl font-bold">Adjust a copy of {clone.title}</h1>
          <Form method="post" className="card mt-4 space-y-3 p-5">
            <input type="hidden" name="intent" value="clone" />
            <input type="hidden" name="slug" value={clone.slug} />
            <input type="hidden" name="edition" value={clone.number} />
            <p className="text-sm">
              This copies the parameters of <code className="font-mono">{clone.key}</code> ({familyLabels[clone.family]}) into a private draft in your workspace.
              The draft remembers this edition; the published edition itself stays as it is.
            </p>
            <div>
              <label htmlFor="clone-title" className="block text-sm font-semibold">Title of your copy</label>
              <input
                id="clone-title"
                name="title"
                className="field mt-1"
                defaultValue={`${clone.title} (copy)`.slice(0, TITLE_MAX)}
                maxLength={TITLE_MAX}
                aria-invalid={errors.title ? true : undefined}
                aria-describedby={errors.title ? "clone-title-error" : undefined}
              />
              <Err id="clone-title-error" msg={errors.title} />
            </div>
            {clone.retracted && (
              <p className="rounded border border-warn/40 bg-warn/5 p-2 text-sm" role="note">
                <span aria-hidden="true">⚠ </span>This edition has been retracted; check its retraction reason before building on it.
              </p>
            )}
            <Err id="clone-error" msg={errors.edition ?? errors.slug} />
            <div className="flex gap-2">
              <button type="submit" className="btn btn-primary" disabled={busy}>
                Copy to my workspace
              </button>
              <Link to={`/library/${clone.slug}/e/${clone.number}`} className="btn btn-quiet">
                Back to the edition
              </Link>
            </div>
          </Form>
        </>
      ) : (
        <>
          <h1 className="mt-1 text-2xl font-bold">New workspace item</h1>
          {error && (
            <p className="mt-3 rounded border border-bad/40 bg-bad/5 p-2 text-sm text-bad" role="alert">
              Cannot clone: {error}.
            </p>
          )}
          <Form method="post" className="card mt-4 space-y-3 p-5" noValidate>
            <input type="hidden" name="intent" value="create" />
            <Err id="form-error" msg={errors.intent ?? errors.slug ?? errors.edition} />
            <div>
              <label htmlFor="family" className="block text-sm font-semibold">Family</label>
              <select id="family" name="family" className="field mt-1" defaultValue="markov" aria-invalid={errors.family ? true : undefined} aria-describedby={errors.family ? "family-error" : undefined}>
                {FAMILIES.map((f) => (
                  <option key={f} value={f}>{familyLabels[f]}</option>
                ))}
              </select>
              <Err id="family-error" msg={errors.family} />
            </div>
            <div>
              <label htmlFor="title" className="block text-sm font-semibold">Title</label>
              <input id="title" name="title" className="field mt-1" maxLength={TITLE_MAX} aria-invalid={errors.title ? true : undefined} aria-describedby={errors.title ? "title-error" : undefined} />
              <Err id="title-error" msg={errors.title} />
            </div>
            <button type="submit" className="btn btn-primary" disabled={busy}>Create item</button>
          </Form>
        </>
      )}
    </div>
  );
}
