import { data } from "react-router";
import { z } from "zod";
import { apiError, rateLimit } from "~/.server/http.server";
import { editionETag, editionResource, getEdition, ifNoneMatchHits } from "~/.server/library.server";
import type { Route } from "./+types/edition";

const REQUESTS_PER_MINUTE = 1200;
const CACHE_CONTROL = "public, max-age=300";

const editionNumber = z
  .string()
  .regex(/^\d{1,15}$/, "the edition must be a whole number (1, 2, 3, …)")
  .transform(Number);

/**
 * GET /api/v1/models/:slug/editions/:edition: one edition's parameters, figures and verification.
 * Editions never change except by retraction, which the ETag includes; a matching
 * If-None-Match gets 304.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const wait = rateLimit(request, REQUESTS_PER_MINUTE);
  if (wait > 0) return apiError(429, `Too many requests; try again in ${wait} s.`, [], { "Retry-After": String(wait) });
  const number = editionNumber.safeParse(params.edition);
  if (!number.success) {
    return apiError(400, `"${params.edition}" is not an edition number.`, [{ path: "edition", message: number.error.issues[0].message }]);
  }
  const record = await getEdition(params.slug, number.data);
  if (!record) {
    return apiError(404, `The library has no edition ${number.data} of "${params.slug}".`, [{ path: "edition", message: "unknown model or edition" }]);
  }
  const etag = editionETag(record);
  const headers = { ETag: etag, "Cache-Control": CACHE_CONTROL };
  if (ifNoneMatchHits(request.headers.get("If-None-Match"), etag)) return new Response(null, { status: 304, headers });
  return data(editionResource(record), { headers });
}
