import { data } from "react-router";
import { apiError, rateLimit, readJsonBody } from "~/.server/http.server";
import { computeFigures, EngineInputError, parseComputeRequest } from "~/engine";
import type { Route } from "./+types/compute";

/** Large graph walks arrive as long edge lists; 64 MB holds 2,000,000 edges with room to spare. */
const BODY_LIMIT = 64 * 1024 * 1024;
const REQUESTS_PER_MINUTE = 1200;

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return apiError(405, "Use POST with a JSON body.", [], { Allow: "POST" });
  const wait = rateLimit(request, REQUESTS_PER_MINUTE);
  if (wait > 0) return apiError(429, `Too many requests; try again in ${wait} s.`, [], { "Retry-After": String(wait) });
  const body = await readJsonBody(request, BODY_LIMIT);
  const parsed = parseComputeRequest(body);
  if (!parsed.ok) return data({ error: parsed.error }, { status: 422 });
  try {
    return data(computeFigures(parsed.value), { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    if (error instanceof EngineInputError) return data({ error: { message: error.message, issues: error.issues } }, { status: 422 });
    throw error;
  }
}

export function loader() {
  return apiError(405, "Use POST /api/v1/compute with a JSON body { \"model\": … }.", [], { Allow: "POST" });
}
