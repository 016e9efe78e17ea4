/**
 * Small HTTP helpers for the API routes: a streamed body reader with a size limit, JSON errors
 * in the contract's shape, and a per-client rate limit.
 */
import { data } from "react-router";

export interface ApiIssue {
  path: string;
  message: string;
}

/** A JSON error response in the API contract's shape. */
export function apiError(status: number, message: string, issues: ApiIssue[] = [], headers?: HeadersInit) {
  return data({ error: { message, issues } }, { status, headers });
}

export class BodyTooLarge extends Error {}

/** Reads the request body as text, refusing (BodyTooLarge) once more than `limit` bytes arrive. */
export async function readBodyText(request: Request, limit: number): Promise<string> {
  const declared = Number(request.headers.get("content-length") ?? "NaN");
  if (Number.isFinite(declared) && declared > limit) throw new BodyTooLarge();
  if (!request.body) return "";
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limit) {
      await reader.cancel().catch(() => {});
      throw new BodyTooLarge();
    }
    chunks.push(value);
  }
  return new TextDecoder().decode(Buffer.concat(chunks));
}

/** Parses a JSON body within the size limit; returns the value or an error response to throw. */
export async function readJsonBody(request: Request, limit: number): Promise<unknown> {
  let text: string;
  try {
    text = await readBodyText(request, limit);
  } catch (error) {
    if (error instanceof BodyTooLarge) {
      throw apiError(413, `The request body is larger than the limit of ${Math.round(limit / 1_000_000)} MB.`);
    }
    throw error;
  }
  if (text.trim() === "") throw apiError(422, "The request body is empty; send JSON.", [{ path: "", message: "empty body" }]);
  try {
    return JSON.parse(text);
  } catch (error) {
    const detail = error instanceof Error ? error.message : String(error);
    throw apiError(422, "The request body is not valid JSON.", [{ path: "", message: detail }]);
  }
}

interface Bucket {
  tokens: number;
  at: number;
}
const buckets = new Map<string, Bucket>();

/**
 * A token bucket per client (the forwarded address, else one shared bucket for direct clients):
 * `perMinute` requests a minute with a burst of the same size. Returns the seconds to wait, or 0.
 * Kept in memory per server process: generous limits make per-instance counting good enough.
 */
export function rateLimit(request: Request, perMinute: number): number {
  const key = request.headers.get("x-forwarded-for")?.split(",")[0]?.trim() || "direct";
  const now = Date.now();
  const bucket = buckets.get(key) ?? { tokens: perMinute, at: now };
  bucket.tokens = Math.min(perMinute, bucket.tokens + ((now - bucket.at) / 60000) * perMinute);
  bucket.at = now;
  if (bucket.tokens < 1) {
    buckets.set(key, bucket);
    return Math.ceil(((1 - bucket.tokens) * 60) / perMinute);
  }
  bucket.tokens -= 1;
  buckets.set(key, bucket);
  if (buckets.size > 10000) buckets.clear();
  return 0;
}
