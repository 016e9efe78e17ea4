import { openProposals } from "~/.server/areas.server";
import { requireCurator } from "~/.server/auth.server";
import { familyLabels } from "~/families";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Review · Ergoshelf" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireCurator(request);
  return { proposals: await openProposals() };
}

export default function Review({ loaderData }: Route.ComponentProps) {
  const { proposals } = loaderData;
  return (
    <div>
      <p className="eyebrow">Curators</p>
      <h1 className="mt-1 text-3xl font-bold">Review queue</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">Proposals waiting for a decision, oldest first.</p>
      {proposals.length === 0 ? (
        <div className="card mt-6 p-6">
          <h2 className="font-semibold">The queue is empty</h2>
          <p className="mt-1 text-sm text-ink-soft">No proposal is waiting for review.</p>
        </div>
      ) : (
        <ul className="mt-6 divide-y divide-rule card">
          {proposals.map((p) => (
            <li key={p.id} className="flex justify-between gap-4 px-4 py-3">
              <span className="font-semibold">{p.title}</span>
              <span className="text-sm text-ink-soft">
                {familyLabels[p.family]} · {p.state} · by {p.author}
              </span>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
