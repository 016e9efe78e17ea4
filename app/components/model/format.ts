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

/**
 * Decimal places that print every value of one table as `formatParam` would (capped), so a column
 * lines up on its decimal point: 0.1, 0.12 and 1 become 0.10, 0.12 and 1.00. Values that need
 * scientific form are left out; they keep it.
 */
export function sharedDecimals(values: readonly number[], cap = 12): number {
  let d = 0;
  for (const x of values) {
    if (!Number.isFinite(x) || x === 0) continue;
    const s = formatParam(x);
    if (s.includes("e")) continue;
    const dot = s.indexOf(".");
    if (dot >= 0) d = Math.max(d, s.length - dot - 1);
  }
  return Math.min(d, cap);
}

/** A given parameter with a table's shared decimals (see sharedDecimals); tiny values keep scientific form. */
export function formatParamAt(x: number, decimals: number): string {
  const s = formatParam(x);
  if (s === "—" || s === "0" || s.includes("e")) return s;
  return x.toFixed(decimals);
}

/**
 * A headline rate: fixed `digits` decimals, except a non-zero value below 0.001, which fixed
 * decimals would cut to one or two significant digits; it gets four in scientific form (2.137e-5).
 */
export function formatHeadline(x: number | null | undefined, digits = 6): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  if (x !== 0 && Math.abs(x) < 1e-3) return x.toExponential(3).replace("e+", "e");
  return x.toFixed(digits);
}

/** A bound width, interval half-width or other small spread: always two significant digits ("2.0e-3"). */
export function formatSpread(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  if (x === 0) return "0";
  return x.toExponential(1).replace("e+", "e");
}

/**
 * Engine notes carry raw doubles ("[1.2464761768421457, …] (half-width 0.0000454389…)"). For reading,
 * every decimal number with more than nine fractional digits is cut to nine decimals, or to four
 * significant digits in scientific form when it is below 0.001.
 */
export function tidyNumbersInText(text: string): string {
  return text.replace(/-?\d+\.\d{10,}(?:e[+-]?\d+)?/gi, (m) => {
    const x = Number(m);
    if (!Number.isFinite(x)) return m;
    if (x !== 0 && Math.abs(x) < 1e-3) return x.toExponential(3).replace("e+", "e");
    return x.toFixed(9);
  });
}
