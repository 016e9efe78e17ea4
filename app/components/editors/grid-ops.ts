/**
 * Pure helpers behind the parameter editors: a draft cell holds a number, or the text the user typed
 * when it is not one yet (so the engine can name it in its own words). No React here.
 */

/** A draft matrix or vector entry: a finite number, or the raw text that did not parse as one. */
export type Cell = number | string;

/** Rows whose sum is off by more than this are marked (the engine's own row-sum tolerance is tighter). */
export const ROW_SUM_MARK = 1e-9;

/** Text → cell: a finite number when the text is one ("0.25", "1e-3", " .5 "), else the text itself. */
export function parseCell(text: string): Cell {
  const t = text.trim().replace(/^\+/, "");
  if (t === "") return text;
  const x = Number(t);
  return Number.isFinite(x) ? x : text;
}

/**
 * A block pasted from a spreadsheet or a CSV file: rows by line, cells by tab (if the text has any
 * tab) else by comma or semicolon. Blank trailing lines are dropped; a ragged block keeps its shape.
 */
export function parseBlock(text: string): Cell[][] {
  const lines = text.replace(/\r\n?/g, "\n").split("\n");
  while (lines.length > 0 && lines[lines.length - 1].trim() === "") lines.pop();
  const sep = text.includes("\t") ? "\t" : /[,;]/;
  return lines.map((line) => line.split(sep).map((c) => parseCell(c)));
}

/** Whether pasted text is a block (more than one cell) rather than one value typed into a cell. */
export function isBlock(text: string): boolean {
  return /[\t,;\n]/.test(text.replace(/\r?\n$/, ""));
}

/** Writes `block` into `rows` starting at (r0, c0); cells beyond the matrix are ignored. O(block). */
export function pasteBlock(rows: readonly (readonly Cell[])[], r0: number, c0: number, block: readonly (readonly Cell[])[]): Cell[][] {
  const out = rows.map((r) => r.slice());
  for (let i = 0; i < block.length && r0 + i < out.length; i++) {
    for (let j = 0; j < block[i].length && c0 + j < out[r0 + i].length; j++) out[r0 + i][c0 + j] = block[i][j];
  }
  return out;
}

/** Sum of a row, or null when a cell is not a number. Kahan-compensated. */
export function rowSum(row: readonly Cell[]): number | null {
  let s = 0;
  let c = 0;
  for (const x of row) {
    if (typeof x !== "number") return null;
    const y = x - c;
    const t = s + y;
    c = t - s - y;
    s = t;
  }
  return s;
}

/** Whether a row needs attention: a non-number, or a sum off 1 by more than ROW_SUM_MARK. */
export function rowIsOff(row: readonly Cell[]): boolean {
  const s = rowSum(row);
  return s === null || Math.abs(s - 1) > ROW_SUM_MARK;
}

/** Rounds away float noise (0.30000000000000004 → 0.3) so normalised rows read cleanly. */
export function tidy(x: number): number {
  return Number(x.toPrecision(12));
}

/**
 * The row divided by its sum. A row with a non-number, a negative entry or a zero sum is returned
 * unchanged (there is nothing sensible to scale; the engine's message says why).
 */
export function normaliseRow(row: readonly Cell[]): Cell[] {
  const s = rowSum(row);
  if (s === null || s <= 0 || row.some((x) => (x as number) < 0)) return row.slice();
  const out = row.map((x) => tidy((x as number) / s));
  // Rounding to 12 digits leaves the sum within about n·5e-13 of 1; when that exceeds 1e-12 (long
  // rows), put the remainder on the largest entry so the row stays well inside the engine's 1e-9.
  const rest = 1 - (rowSum(out) as number);
  if (Math.abs(rest) > 1e-12) {
    let k = 0;
    for (let j = 1; j < out.length; j++) if ((out[j] as number) > (out[k] as number)) k = j;
    out[k] = (out[k] as number) + rest;
  }
  return out;
}

/** Every row normalised. */
export function normaliseAll(rows: readonly (readonly Cell[])[]): Cell[][] {
  return rows.map((r) => normaliseRow(r));
}

/**
 * A matrix rebuilt over new rows and columns: entry (i, j) comes from old (rowSource[i], colSource[j]);
 * a new row (source −1) is uniform, a new column (source −1) starts at 0 in kept rows. O(rows·cols).
 */
export function remapMatrix(M: readonly (readonly Cell[])[], rowSource: readonly number[], colSource: readonly number[]): Cell[][] {
  const width = colSource.length;
  return rowSource.map((ri) => {
    if (ri < 0 || ri >= M.length) return new Array<Cell>(width).fill(width > 0 ? tidy(1 / width) : 0);
    return colSource.map((cj) => (cj < 0 ? 0 : (M[ri][cj] ?? 0)));
  });
}

/**
 * After a column was removed: each new row whose source row summed to 1 before is rescaled to sum to
 * 1 again (the removed successor's share goes to the others in proportion). Rows that were already
 * off, new rows, and rows left summing to 0 are kept as they are, so the grid still marks them. O(rows·cols).
 */
export function renormaliseKeptRows(next: readonly (readonly Cell[])[], rowSource: readonly number[], before: readonly (readonly Cell[])[]): Cell[][] {
  return next.map((row, i) => {
    const src = rowSource[i];
    return src >= 0 && src < before.length && !rowIsOff(before[src]) ? normaliseRow(row) : row.slice();
  });
}

/** The identity source map after appending one label to n: [0, 1, …, n−1, −1]. */
export function sourcesAfterAdd(n: number): number[] {
  return [...Array.from({ length: n }, (_, i) => i), -1];
}

/** The source map after removing index `k` of n: [0, …, k−1, k+1, …, n−1]. */
export function sourcesAfterRemove(n: number, k: number): number[] {
  return Array.from({ length: n }, (_, i) => i).filter((i) => i !== k);
}

/**
 * Row sources for an order-k chain when the alphabet changes: new context c (lexicographic over the
 * new alphabet, c = Σ x_t m^(k−1−t)) comes from the old context with the same symbols, or −1 if any of
 * its symbols is new. O(m^k·k).
 */
export function contextSources(symbolSource: readonly number[], oldSize: number, order: number): number[] {
  const m = symbolSource.length;
  const count = m ** order;
  const out = new Array<number>(count);
  for (let c = 0; c < count; c++) {
    let rest = c;
    let old = 0;
    let place = 1;
    let ok = true;
    for (let t = 0; t < order; t++) {
      const digit = rest % m;
      rest = Math.floor(rest / m);
      const src = symbolSource[digit];
      if (src < 0) ok = false;
      old += src * place;
      place *= oldSize;
    }
    out[c] = ok ? old : -1;
  }
  return out;
}

/** Context row labels of an order-k chain, "a·b" style, in row order. */
export function contextRowLabels(alphabet: readonly string[], order: number): string[] {
  const m = alphabet.length;
  const count = m ** order;
  const out: string[] = [];
  for (let c = 0; c < count; c++) {
    const parts = new Array<string>(order);
    let rest = c;
    for (let t = order - 1; t >= 0; t--) {
      parts[t] = alphabet[rest % m];
      rest = Math.floor(rest / m);
    }
    out.push(parts.join("·"));
  }
  return out;
}

/** A label not yet in `labels`: base + the next free number ("s4"). */
export function freshLabel(labels: readonly string[], base: string): string {
  const taken = new Set(labels);
  for (let i = labels.length + 1; ; i++) if (!taken.has(`${base}${i}`)) return `${base}${i}`;
}

/**
 * Edges from CSV text, one "u,v,w" per line (tab or semicolon also separate; '#' starts a comment).
 * Returns the edges and a message per line that could not be read (numbered from 1).
 */
export function parseEdgeCsv(text: string): { edges: [string, string, Cell][]; problems: string[] } {
  const edges: [string, string, Cell][] = [];
  const problems: string[] = [];
  const lines = text.replace(/\r\n?/g, "\n").split("\n");
  lines.forEach((raw, i) => {
    const line = raw.replace(/#.*$/, "").trim();
    if (line === "") return;
    const parts = line.split(/\s*[,\t;]\s*/);
    if (parts.length !== 3 || parts[0] === "" || parts[1] === "") {
      problems.push(`line ${i + 1}: expected "u,v,w"; got ${JSON.stringify(raw.trim())}`);
      return;
    }
    const w = parseCell(parts[2]);
    if (typeof w !== "number") {
      if (i === 0 && edges.length === 0) return; // a header line such as "u,v,w"
      problems.push(`line ${i + 1}: the weight ${JSON.stringify(parts[2])} is not a number`);
      return;
    }
    edges.push([parts[0], parts[1], w]);
  });
  return { edges, problems };
}

/** Issues by path ("P[2][1]") for quick lookup by the editors. */
export function issuesByPath(issues: readonly { path: string; message: string }[]): Map<string, string[]> {
  const map = new Map<string, string[]>();
  for (const i of issues) {
    const key = i.path.replace(/^model\.?/, "");
    map.set(key, [...(map.get(key) ?? []), i.message]);
  }
  return map;
}
