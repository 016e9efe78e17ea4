import { data } from "react-router";
import { apiError, rateLimit } from "~/.server/http.server";
import { searchLibrary } from "~/.server/search.server";
import { parseSearchParams } from "~/search-params";
import type { Route } from "./+types/search";

const REQUESTS_PER_MINUTE = 1200;

/** GET /api/v1/search?q=…&family=…: the library search, as the library page queries it while typing. */
export async function loader({ request }: Route.LoaderArgs) {
  const wait = rateLimit(request, REQUESTS_PER_MINUTE);
  if (wait > 0) return apiError(429, `Too many requests; try again in ${wait} s.`, [], { "Retry-After": String(wait) });
  const parsed = parseSearchParams(new URL(request.url).searchParams);
  if (!parsed.ok) return data({ error: parsed.error }, { status: 400 });
  return data(await searchLibrary(parsed.value), { headers: { "Cache-Control": "no-cache" } });
}
