import { data } from "react-router";
import { apiError, rateLimit } from "~/.server/http.server";
import { getModelWithEditions, modelResource } from "~/.server/library.server";
import type { Route } from "./+types/model";

const REQUESTS_PER_MINUTE = 1200;

/** GET /api/v1/models/:slug: one model with its edition list and links. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const wait = rateLimit(request, REQUESTS_PER_MINUTE);
  if (wait > 0) return apiError(429, `Too many requests; try again in ${wait} s.`, [], { "Retry-After": String(wait) });
  const found = await getModelWithEditions(params.slug);
  if (!found) return apiError(404, `The library has no model with the slug "${params.slug}".`, [{ path: "slug", message: "unknown model" }]);
  return data(modelResource(found), { headers: { "Cache-Control": "no-cache" } });
}
