/**
 * Ergoshelf's sequential scale for heat-mapped matrix cells: one hue family (slate blue), lightness
 * falling steadily from near-paper to a mid blue, so order reads without hue and survives the common
 * colour-vision deficiencies. Every stop keeps dark ink text above 4.5:1 contrast (WCAG AA), so the
 * printed number stays readable on any cell; the shade only supports the number, it never replaces it.
 */
const STOPS: [number, number, number][] = [
  [0xfb, 0xfa, 0xf5],
  [0xe1, 0xea, 0xee],
  [0xc0, 0xd5, 0xe3],
  [0x98, 0xba, 0xd6],
  [0x74, 0x9d, 0xc4],
];

/** Background colour for a value t in [0, 1] (clamped). */
export function heatColour(t: number): string {
  const x = Number.isFinite(t) ? Math.min(1, Math.max(0, t)) : 0;
  const pos = x * (STOPS.length - 1);
  const i = Math.min(STOPS.length - 2, Math.floor(pos));
  const f = pos - i;
  const c = STOPS[i].map((v, k) => Math.round(v + (STOPS[i + 1][k] - v) * f));
  return `rgb(${c[0]} ${c[1]} ${c[2]})`;
}

/** The scale's stops, for the legend. */
export const HEAT_LEGEND = [0, 0.25, 0.5, 0.75, 1].map((t) => ({ t, colour: heatColour(t) }));

/**
 * The plot palette: colour-blind-safe (blue, a vivid orange-yellow, bluish green, reddish purple),
 * distinct from the terracotta accent; lines also differ by dash and marker.
 */
export const PLOT = {
  perSymbol: "#1f5f99",
  conditional: "#b5770a",
  lower: "#1b7a5e",
  reference: "#5a5247",
  renyi: "#1f5f99",
  minEntropy: "#8a3f7a",
} as const;
