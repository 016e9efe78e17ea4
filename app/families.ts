/** The process families, in the trade's words (client-safe). */
export const familyLabels: Record<string, string> = {
  iid: "i.i.d. source",
  markov: "Markov chain",
  "two-state": "Two-state chain",
  "graph-walk": "Random walk on a weighted graph",
  hidden: "Hidden Markov source",
};

/** A figure in bits per symbol, as shown in tables. */
export function formatBits(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  return value.toFixed(digits);
}

/** Short family names for dense tables. */
export const familyShort: Record<string, string> = {
  iid: "i.i.d.",
  markov: "Markov",
  "two-state": "two-state",
  "graph-walk": "graph walk",
  hidden: "hidden",
};
