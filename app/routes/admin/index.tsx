import { allUsers, recentAudit } from "~/.server/areas.server";
import { requireAdmin } from "~/.server/auth.server";
import { roleLabels, type Role } from "~/permissions";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Admin · Ergoshelf" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireAdmin(request);
  const [users, audit] = await Promise.all([allUsers(), recentAudit()]);
  return { users, audit };
}

export default function Admin({ loaderData }: Route.ComponentProps) {
  const { users, audit } = loaderData;
  return (
    <div className="space-y-10">
      <div>
        <p className="eyebrow">Administration</p>
        <h1 className="mt-1 text-3xl font-bold">Accounts</h1>
        <div className="card mt-4 overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-rule bg-paper-deep/50 text-xs uppercase tracking-wide text-ink-soft">
              <tr>
                <th scope="col" className="px-4 py-2">Name</th>
                <th scope="col" className="px-4 py-2">E-mail</th>
                <th scope="col" className="px-4 py-2">Role</th>
                <th scope="col" className="px-4 py-2">Status</th>
              </tr>
            </thead>
            <tbody>
              {users.map((u) => (
                <tr key={u.id} className="border-b border-rule/60 last:border-0">
                  <td className="px-4 py-2 font-semibold">{u.name}</td>
                  <td className="px-4 py-2 font-mono text-xs">{u.email}</td>
                  <td className="px-4 py-2">{roleLabels[u.role as Role] ?? u.role}</td>
                  <td className="px-4 py-2">{u.disabled ? "Disabled" : "Active"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </div>
      <div>
        <h2 className="text-xl font-bold">Recent audit events</h2>
        {audit.length === 0 ? (
          <p className="mt-2 text-sm text-ink-soft">Nothing recorded yet.</p>
        ) : (
          <ul className="card mt-4 divide-y divide-rule text-sm">
            {audit.map((a) => (
              <li key={a.id} className="flex flex-wrap justify-between gap-2 px-4 py-2">
                <span>
                  <code className="font-mono text-xs">{a.action}</code> {a.target ? <span className="text-ink-soft">· {a.target}</span> : null}
                </span>
                <span className="text-ink-soft figures">{new Date(a.at).toISOString().replace("T", " ").slice(0, 16)} UTC</span>
              </li>
            ))}
          </ul>
        )}
      </div>
    </div>
  );
}
