import { data } from "react-router";
import { databaseAnswers } from "~/.server/db.server";
import type { Route } from "./+types/healthz";

/** 200 `{ ok: true, db: true }` only when the database answers; 503 with a JSON error otherwise. */
export async function loader(_: Route.LoaderArgs) {
  const up = await databaseAnswers();
  const headers = { "Cache-Control": "no-store" };
  if (up) return data({ ok: true, db: true }, { headers });
  return data({ ok: false, db: false, error: { message: "The database does not answer." } }, { status: 503, headers });
}
