import { Link } from "react-router";
import { requireContributor } from "~/.server/auth.server";
import { listAuthorProposals } from "~/.server/proposals.server";
import { StateBadge, when } from "~/components/review/proposal-parts";
import { familyLabels } from "~/families";
import { proposalKindLabels } from "~/proposal-forms";
import type { Route } from "./+types/proposals";

export const meta: Route.MetaFunction = () => [{ title: "My proposals · Ergoshelf" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireContributor(request);
  return { proposals: await listAuthorProposals(user.id) };
}

export default function MyProposals({ loaderData }: Route.ComponentProps) {
  const { proposals } = loaderData;
  return (
    <div>
      <p className="eyebrow">
        <Link to="/workspace">Workspace</Link>
      </p>
      <h1 className="mt-1 text-3xl font-bold">My proposals</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">What you have sent to the curators, newest first. Open one to read the thread, reply, resubmit or withdraw.</p>
      {proposals.length === 0 ? (
        <div className="card mt-6 p-6">
          <h2 className="font-semibold">No proposals yet</h2>
          <p className="mt-1 text-sm text-ink-soft">
            Open an item in your <Link to="/workspace">workspace</Link> and choose “Submit for review”.
          </p>
        </div>
      ) : (
        <div className="card mt-6 overflow-x-auto">
          <table className="w-full text-sm" data-testid="my-proposals">
            <caption className="sr-only">My proposals</caption>
            <thead className="border-b border-rule text-left text-ink-soft">
              <tr>
                <th scope="col" className="px-4 py-2 font-semibold">Proposal</th>
                <th scope="col" className="px-4 py-2 font-semibold">State</th>
                <th scope="col" className="px-4 py-2 font-semibold">Kind</th>
                <th scope="col" className="px-4 py-2 font-semibold">Family</th>
                <th scope="col" className="px-4 py-2 font-semibold">Last change</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-rule">
              {proposals.map((p) => (
                <tr key={p.id}>
                  <th scope="row" className="px-4 py-2 text-left font-semibold">
                    <Link to={`/workspace/proposals/${p.id}`}>{p.title}</Link>
                    {p.slug && <span className="block font-mono text-xs font-normal text-ink-soft">{p.slug}</span>}
                  </th>
                  <td className="px-4 py-2">
                    <StateBadge state={p.state} />
                  </td>
                  <td className="px-4 py-2">{proposalKindLabels[p.kind]}</td>
                  <td className="px-4 py-2">{familyLabels[p.family]}</td>
                  <td className="figures px-4 py-2 font-mono text-xs whitespace-nowrap">{when(p.updatedAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
