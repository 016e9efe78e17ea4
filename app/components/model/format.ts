/**
 * Number and date formatting for the model page. Deterministic (no locale), so the server render
 * and the browser's hydration print the same characters.
 */

/** A given parameter as a person wrote it: up to 12 significant digits, no float noise. */
export function formatParam(x: number): string {
  if (!Number.isFinite(x)) return "—";
  if (x === 0) return "0";
  const s = Number(x.toPrecision(12)).toString();
  return s.includes("e") ? x.toExponential(4) : s;
}

/** A probability or figure with fixed digits; very small non-zero values in scientific form. */
export function formatFixed(x: number | null | undefined, digits = 6): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  if (x !== 0 && Math.abs(x) < 10 ** -digits) return x.toExponential(3);
  return x.toFixed(digits);
}

/** A difference or tolerance: "0", "1.2e-15", "3.4e-3". */
export function formatSmall(x: number | null | undefined, digits = 2): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  if (x === 0) return "0";
  const e = x.toExponential(digits - 1);
  return e.replace(/\.0+e/, "e").replace("e+", "e");
}

/** A signed change: "+0.0120", "−0.0010" (true minus sign). */
export function formatDelta(x: number | null | undefined, digits = 6): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  if (x === 0) return "0";
  const abs = Math.abs(x);
  const body = abs < 10 ** -digits ? abs.toExponential(2) : abs.toFixed(digits);
  return `${x < 0 ? "−" : "+"}${body}`;
}

/** A date as YYYY-MM-DD (UTC): the same on server and browser. */
export function formatDate(d: Date | string | null | undefined): string {
  if (!d) return "—";
  const date = typeof d === "string" ? new Date(d) : d;
  return Number.isNaN(date.getTime()) ? "—" : date.toISOString().slice(0, 10);
}

/** A tolerance record in words: "1e-9" when absolute and relative agree. */
export function formatTolerance(t: { abs: number; rel: number }): string {
  if (t.abs === t.rel) return formatSmall(t.abs);
  if (t.rel === 0) return `${formatSmall(t.abs)} (absolute)`;
  if (t.abs === 0) return `${formatSmall(t.rel)} (relative)`;
  return `${formatSmall(t.abs)} absolute or ${formatSmall(t.rel)} relative`;
}
