/** The y axes of the model page's plots (client-safe, pure). */

/**
 * A y axis with round ticks (steps of 1, 2, 2.5 or 5 × 10ᵏ) that covers the values, and the decimals
 * its labels need. A flat series (an i.i.d. source's block entropies) gets a small band around it.
 */
export function niceAxis(values: readonly (number | null | undefined)[], opts: { floor?: number; ticks?: number } = {}) {
  const xs = values.filter((v): v is number => typeof v === "number" && Number.isFinite(v));
  let lo = xs.length ? Math.min(...xs) : 0;
  let hi = xs.length ? Math.max(...xs) : 1;
  if (opts.floor !== undefined) lo = Math.min(lo, opts.floor);
  if (hi - lo < 1e-12) {
    const pad = Math.max(Math.abs(hi) * 0.05, 1e-3);
    hi += pad;
    lo = opts.floor !== undefined ? opts.floor : lo - pad;
  }
  const raw = (hi - lo) / Math.max(1, (opts.ticks ?? 5) - 1);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = ([1, 2, 2.5, 5, 10].find((m) => m * mag >= raw) ?? 10) * mag;
  const start = Math.floor(lo / step + 1e-9) * step;
  const end = Math.ceil(hi / step - 1e-9) * step;
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9)) + (Math.abs(step / mag - 2.5) < 1e-9 && mag <= 1 ? 1 : 0);
  const ticks: number[] = [];
  for (let k = 0; start + k * step <= end + step * 1e-6; k++) ticks.push(Number((start + k * step).toFixed(decimals + 2)));
  return { domain: [ticks[0], ticks[ticks.length - 1]] as [number, number], ticks, decimals };
}
