import { data } from "react-router";
import { apiError, rateLimit } from "~/.server/http.server";
import { listModelsPage } from "~/.server/library.server";
import { parseSearchParams } from "~/search-params";
import type { Route } from "./+types/models";

const REQUESTS_PER_MINUTE = 1200;

/** GET /api/v1/models: the library's models, page by page; takes the search parameters. */
export async function loader({ request }: Route.LoaderArgs) {
  const wait = rateLimit(request, REQUESTS_PER_MINUTE);
  if (wait > 0) return apiError(429, `Too many requests; try again in ${wait} s.`, [], { "Retry-After": String(wait) });
  const parsed = parseSearchParams(new URL(request.url).searchParams);
  if (!parsed.ok) return data({ error: parsed.error }, { status: 400 });
  return data(await listModelsPage(parsed.value), { headers: { "Cache-Control": "no-cache" } });
}
