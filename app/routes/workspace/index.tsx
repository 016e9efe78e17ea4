import { workspaceItemsOf } from "~/.server/areas.server";
import { requireContributor } from "~/.server/auth.server";
import { familyLabels } from "~/families";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Workspace · Ergoshelf" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireContributor(request);
  return { items: await workspaceItemsOf(user.id) };
}

export default function Workspace({ loaderData }: Route.ComponentProps) {
  const { items } = loaderData;
  return (
    <div>
      <p className="eyebrow">Private to you</p>
      <h1 className="mt-1 text-3xl font-bold">Workspace</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">
        Drafts you have cloned from a library edition or started yourself. Only you can see them until you submit one for review.
      </p>
      {items.length === 0 ? (
        <div className="card mt-6 p-6">
          <h2 className="font-semibold">No drafts yet</h2>
          <p className="mt-1 text-sm text-ink-soft">
            Open a model in the <a href="/library">library</a> to see its figures; drafts you make will be listed here.
          </p>
        </div>
      ) : (
        <ul className="mt-6 divide-y divide-rule card">
          {items.map((item) => (
            <li key={item.id} className="flex justify-between gap-4 px-4 py-3">
              <span className="font-semibold">{item.title}</span>
              <span className="text-sm text-ink-soft">
                {familyLabels[item.family]} · revision {item.revision}
              </span>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
