import { Outlet } from "react-router";
import { requireContributor } from "~/.server/auth.server";
import type { Route } from "./+types/layout";

/** Gate for the whole area; each child still checks on its own (loaders run in parallel). */
export async function loader({ request }: Route.LoaderArgs) {
  await requireContributor(request);
  return null;
}

export default function Layout() {
  return <Outlet />;
}
