import { data } from "react-router";
import type { Route } from "./+types/not-found";

export function loader({ request }: Route.LoaderArgs) {
  const path = new URL(request.url).pathname;
  throw data({ message: `There is no page at ${path}. The address may be mistyped, or the page may have moved; models and editions keep their addresses for good.` }, { status: 404 });
}

export const meta: Route.MetaFunction = () => [{ title: "Not found · Ergoshelf" }];

export default function NotFound() {
  return null;
}
