// /admin — accounts (role and status, each change audited) and the audit log.
import { data, Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { z } from "zod";
import { allUsers, auditPage } from "~/.server/areas.server";
import { requireAdmin } from "~/.server/auth.server";
import { changeRole, setDisabled } from "~/.server/curation.server";
import { roleLabels, roles, type Role } from "~/permissions";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Admin · Ergoshelf" }];

const querySchema = z.object({
  action: z.string().regex(/^[a-z-]+\.[a-z-]+$/).optional().catch(undefined),
  page: z.coerce.number().int().min(1).max(100_000).catch(1).default(1),
});

export async function loader({ request }: Route.LoaderArgs) {
  const me = await requireAdmin(request);
  const q = querySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  const [users, audit] = await Promise.all([allUsers(), auditPage({ action: q.action, page: q.page })]);
  return { users, audit, query: q, meId: me.id };
}

const uuid = z.uuid({ error: "the account is not named correctly" });
const actionSchema = z.discriminatedUnion(
  "intent",
  [
    z.object({ intent: z.literal("role"), userId: uuid, role: z.enum(roles, { error: `the role is one of ${roles.join(", ")}` }) }),
    z.object({ intent: z.literal("disable"), userId: uuid }),
    z.object({ intent: z.literal("enable"), userId: uuid }),
  ],
  { error: 'intent must be "role", "disable" or "enable"' },
);

export async function action({ request }: Route.ActionArgs) {
  const me = await requireAdmin(request);
  const parsed = actionSchema.safeParse(Object.fromEntries(await request.formData()));
  if (!parsed.success) return data({ message: `Nothing changed: ${parsed.error.issues[0].message}.` }, { status: 400 });
  const f = parsed.data;
  const outcome = f.intent === "role" ? await changeRole(me, f.userId, f.role) : await setDisabled(me, f.userId, f.intent === "disable");
  if (!outcome.ok) return data({ message: outcome.message }, { status: outcome.status });
  return redirect("/admin");
}

function detailsText(details: unknown): string {
  if (!details || typeof details !== "object") return "";
  return Object.entries(details as Record<string, unknown>)
    .filter(([, v]) => v !== null && v !== undefined && v !== "")
    .map(([k, v]) => `${k}: ${typeof v === "string" ? v : JSON.stringify(v)}`)
    .join(" · ");
}

export default function Admin({ loaderData, actionData }: Route.ComponentProps) {
  const { users, audit, query, meId } = loaderData;
  const navigation = useNavigation();
  const busyUser = navigation.state === "submitting" ? String(navigation.formData?.get("userId") ?? "") : "";
  const [params] = useSearchParams();
  const pageHref = (page: number) => {
    const next = new URLSearchParams(params);
    next.set("page", String(page));
    return `?${next}`;
  };
  return (
    <div className="space-y-10">
      <div>
        <p className="eyebrow">Administration</p>
        <h1 className="mt-1 text-3xl font-bold">Accounts</h1>
        <p className="mt-2 max-w-2xl text-sm text-ink-soft">
          Contributors keep a workspace and submit proposals; curators also review them and retract editions; administrators also manage accounts. A change takes effect on the account's next request and is written to the audit log.
        </p>
        {actionData && (
          <p className="mt-4 rounded border border-bad/40 bg-bad/5 p-3 text-sm" role="alert" data-testid="admin-refusal">
            {actionData.message}
          </p>
        )}
        <div className="card mt-4 overflow-x-auto">
          <table className="w-full text-left text-sm" data-testid="accounts">
            <thead className="border-b border-rule bg-paper-deep/50 text-xs uppercase tracking-wide text-ink-soft">
              <tr>
                <th scope="col" className="px-4 py-2">Name</th>
                <th scope="col" className="px-4 py-2">E-mail</th>
                <th scope="col" className="px-4 py-2">Role</th>
                <th scope="col" className="px-4 py-2">Status</th>
              </tr>
            </thead>
            <tbody>
              {users.map((u) => {
                const self = u.id === meId;
                const busy = busyUser === u.id;
                return (
                  <tr key={u.id} className="border-b border-rule/60 last:border-0 align-middle">
                    <td className="px-4 py-2 font-semibold">
                      {u.name}
                      {self && <span className="ml-1 text-xs font-normal text-ink-soft">(you)</span>}
                      {u.isDemo && <span className="ml-1 text-xs font-normal text-ink-soft">(demo)</span>}
                    </td>
                    <td className="px-4 py-2 font-mono text-xs">{u.email}</td>
                    <td className="px-4 py-2">
                      {self ? (
                        roleLabels[u.role as Role]
                      ) : (
                        <Form method="post" className="flex items-center gap-2">
                          <input type="hidden" name="intent" value="role" />
                          <input type="hidden" name="userId" value={u.id} />
                          <label className="sr-only" htmlFor={`role-${u.id}`}>
                            Role of {u.email}
                          </label>
                          <select id={`role-${u.id}`} name="role" defaultValue={u.role} className="field w-auto py-1 text-sm">
                            {roles.map((r) => (
                              <option key={r} value={r}>
                                {roleLabels[r]}
                              </option>
                            ))}
                          </select>
                          <button type="submit" className="btn btn-quiet py-1 text-xs" disabled={busy}>
                            Set role
                          </button>
                        </Form>
                      )}
                    </td>
                    <td className="px-4 py-2">
                      <span className={u.disabled ? "text-bad" : ""}>{u.disabled ? "Disabled" : "Active"}</span>
                      {!self && (
                        <Form method="post" className="ml-2 inline">
                          <input type="hidden" name="intent" value={u.disabled ? "enable" : "disable"} />
                          <input type="hidden" name="userId" value={u.id} />
                          <button type="submit" className="btn btn-quiet py-1 text-xs" disabled={busy} aria-label={`${u.disabled ? "Enable" : "Disable"} ${u.email}`}>
                            {u.disabled ? "Enable" : "Disable"}
                          </button>
                        </Form>
                      )}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
      </div>

      <div>
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 className="text-xl font-bold">Audit log</h2>
          <Form method="get" className="flex items-end gap-2 text-sm">
            <label className="block">
              <span className="block text-xs font-semibold text-ink-soft">Action</span>
              <select name="action" defaultValue={query.action ?? ""} className="field w-auto py-1 text-sm">
                <option value="">All actions</option>
                {audit.actions.map((a) => (
                  <option key={a} value={a}>
                    {a}
                  </option>
                ))}
              </select>
            </label>
            <button type="submit" className="btn btn-quiet py-1">
              Show
            </button>
          </Form>
        </div>
        <p className="mt-1 text-sm text-ink-soft figures">
          {audit.total} {audit.total === 1 ? "event" : "events"}
          {query.action ? ` of ${query.action}` : ""}, newest first. Publishing, decisions, retractions, account changes and failed sign-ins are recorded.
        </p>
        {audit.rows.length === 0 ? (
          <p className="card mt-4 p-4 text-sm text-ink-soft">Nothing recorded{query.action ? " for this action" : " yet"}.</p>
        ) : (
          <div className="card mt-4 overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="audit-log">
              <thead className="border-b border-rule bg-paper-deep/50 text-xs uppercase tracking-wide text-ink-soft">
                <tr>
                  <th scope="col" className="px-4 py-2">When (UTC)</th>
                  <th scope="col" className="px-4 py-2">Who</th>
                  <th scope="col" className="px-4 py-2">Action</th>
                  <th scope="col" className="px-4 py-2">Target</th>
                  <th scope="col" className="px-4 py-2">Details</th>
                </tr>
              </thead>
              <tbody>
                {audit.rows.map((a) => (
                  <tr key={a.id} className="border-b border-rule/60 last:border-0 align-top">
                    <td className="whitespace-nowrap px-4 py-2 figures">{new Date(a.at).toISOString().replace("T", " ").slice(0, 19)}</td>
                    <td className="px-4 py-2 font-mono text-xs">{a.actor ?? "—"}</td>
                    <td className="px-4 py-2">
                      <code className="font-mono text-xs">{a.action}</code>
                    </td>
                    <td className="max-w-56 break-all px-4 py-2 font-mono text-xs">{a.target ?? "—"}</td>
                    <td className="max-w-md break-words px-4 py-2 text-xs text-ink-soft">{detailsText(a.details)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        {audit.pages > 1 && (
          <nav className="mt-3 flex items-center gap-3 text-sm" aria-label="Audit log pages">
            {query.page > 1 && <Link to={pageHref(query.page - 1)}>← Newer</Link>}
            <span className="figures text-ink-soft">
              Page {query.page} of {audit.pages}
            </span>
            {query.page < audit.pages && <Link to={pageHref(query.page + 1)}>Older →</Link>}
          </nav>
        )}
      </div>
    </div>
  );
}
