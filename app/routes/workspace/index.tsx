import { Form, Link } from "react-router";
import { requireContributor } from "~/.server/auth.server";
import { listAuthorProposals } from "~/.server/proposals.server";
import { listWorkspaceItems } from "~/.server/workspace.server";
import { openProposalStates } from "~/proposal-forms";
import { FAMILIES } from "~/engine";
import { familyLabels } from "~/families";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Workspace · Ergoshelf" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireContributor(request);
  const [items, proposals] = await Promise.all([listWorkspaceItems(user.id), listAuthorProposals(user.id)]);
  const open = proposals.filter((p) => openProposalStates.includes(p.state));
  return { items, proposalCount: proposals.length, openCount: open.length, waitingOnYou: open.filter((p) => p.state === "changes-requested").length };
}

function when(d: Date | string): string {
  return new Date(d).toISOString().slice(0, 16).replace("T", " ") + " UTC";
}

export default function Workspace({ loaderData }: Route.ComponentProps) {
  const { items, proposalCount, openCount, waitingOnYou } = loaderData;
  return (
    <div>
      <p className="eyebrow">Private to you</p>
      <h1 className="mt-1 text-3xl font-bold">Workspace</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">
        Drafts you have cloned from a library edition or started yourself. Only you can see them until you submit one for review.
      </p>
      <p className="mt-3 text-sm" data-testid="proposals-link">
        <Link to="/workspace/proposals" className="font-semibold">
          My proposals
        </Link>{" "}
        <span className="text-ink-soft">
          {proposalCount === 0
            ? "(none yet)"
            : `(${openCount} open of ${proposalCount}${waitingOnYou ? `; ${waitingOnYou} with changes requested, waiting for you` : ""})`}
        </span>
      </p>
      <div className="mt-6 grid gap-6 lg:grid-cols-[1fr_18rem]">
        <section aria-labelledby="items-title" className="min-w-0">
          <h2 id="items-title" className="sr-only">Your items</h2>
          {items.length === 0 ? (
            <div className="card p-6">
              <h3 className="font-semibold">No drafts yet</h3>
              <p className="mt-1 text-sm text-ink-soft">
                To start from a published model, open it in the <Link to="/library">library</Link> and choose <strong>Adjust a copy</strong>: the
                edition's parameters are copied into a draft here and the edition it came from is remembered.
                Or start a new item of any family with the form beside this list.
              </p>
            </div>
          ) : (
            <div className="card relative overflow-x-auto">
              <table className="w-full text-sm">
                <thead>
                  <tr className="border-b border-rule text-left text-xs text-ink-soft">
                    <th scope="col" className="px-3 py-2">Title</th>
                    <th scope="col" className="px-3 py-2">Family</th>
                    <th scope="col" className="px-3 py-2">Cloned from</th>
                    <th scope="col" className="px-3 py-2 text-right">Revision</th>
                    <th scope="col" className="px-3 py-2">Updated</th>
                  </tr>
                </thead>
                <tbody>
                  {items.map((item) => (
                    <tr key={item.id} className="border-b border-rule/60 align-top">
                      <td className="px-3 py-2 font-semibold">
                        <Link to={`/workspace/${item.id}`}>{item.title}</Link>
                      </td>
                      <td className="px-3 py-2">{familyLabels[item.family]}</td>
                      <td className="px-3 py-2 text-xs">
                        {item.sourceModel ? (
                          <>
                            <Link to={item.sourceModel.path}>{item.sourceModel.title}</Link>,{" "}
                            <Link to={item.sourcePath!} className="whitespace-nowrap">edition {item.sourceModel.edition}</Link>
                            <span className="mt-0.5 block font-mono break-all text-ink-soft">{item.source}</span>
                          </>
                        ) : (
                          <span className="text-ink-soft">started here</span>
                        )}
                      </td>
                      <td className="figures px-3 py-2 text-right font-mono">{item.revision}</td>
                      <td className="figures px-3 py-2 font-mono text-xs whitespace-nowrap">{when(item.updatedAt)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </section>
        <section aria-labelledby="new-title" className="card p-4">
          <h2 id="new-title" className="font-semibold">New item</h2>
          <Form method="post" action="/workspace/new" className="mt-3 space-y-3">
            <input type="hidden" name="intent" value="create" />
            <div>
              <label htmlFor="new-family" className="block text-sm font-semibold">Family</label>
              <select id="new-family" name="family" className="field mt-1" defaultValue="markov">
                {FAMILIES.map((f) => (
                  <option key={f} value={f}>{familyLabels[f]}</option>
                ))}
              </select>
            </div>
            <div>
              <label htmlFor="new-title-field" className="block text-sm font-semibold">Title</label>
              <input id="new-title-field" name="title" className="field mt-1" required maxLength={200} placeholder="e.g. Buoy K02 pump states, refit" />
            </div>
            <p className="text-xs text-ink-soft">The item starts from a small valid model of that family, ready to edit.</p>
            <button type="submit" className="btn btn-primary">Create item</button>
          </Form>
        </section>
      </div>
    </div>
  );
}
