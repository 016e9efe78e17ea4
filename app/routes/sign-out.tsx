import { redirect } from "react-router";
import { endSession } from "~/.server/session.server";
import type { Route } from "./+types/sign-out";

export async function action({ request }: Route.ActionArgs) {
  const cookie = await endSession(request);
  return redirect("/", { headers: { "Set-Cookie": cookie } });
}

export function loader() {
  return redirect("/");
}
