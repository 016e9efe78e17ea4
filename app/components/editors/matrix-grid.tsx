/**
 * A stochastic-matrix grid: one text input per entry, arrow keys and Enter move between entries,
 * a pasted spreadsheet/CSV block fills cells from the focused one, each row shows its sum and is
 * marked (icon + words) when it does not sum to 1.
 */
import { Fragment, useEffect, useRef, useState } from "react";
import { isBlock, normaliseAll, normaliseRow, parseBlock, parseCell, pasteBlock, rowIsOff, rowSum, type Cell } from "./grid-ops";

/** A number input that keeps the user's text while they type ("0." stays "0."). */
export function CellInput({
  value,
  onValue,
  className = "",
  ...rest
}: { value: Cell; onValue: (c: Cell) => void } & Omit<React.InputHTMLAttributes<HTMLInputElement>, "value" | "onChange">) {
  const [text, setText] = useState(String(value));
  useEffect(() => {
    if (parseCell(text) !== value) setText(String(value));
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [value]);
  return (
    <input
      {...rest}
      type="text"
      inputMode="decimal"
      autoComplete="off"
      spellCheck={false}
      value={text}
      onChange={(e) => {
        setText(e.target.value);
        onValue(parseCell(e.target.value));
      }}
      className={`field figures font-mono text-sm ${className}`}
    />
  );
}

export interface MatrixGridProps {
  /** Used for ids and the issue paths, e.g. "P" or "B". */
  name: string;
  caption: string;
  rowLabels: readonly string[];
  colLabels: readonly string[];
  rows: Cell[][];
  onChange: (rows: Cell[][]) => void;
  /** Engine issues by path ("P[2][1]", "P[2]"). */
  issues: Map<string, string[]>;
  /** How an entry is described to a screen reader, e.g. (from, to) => `P(${from} → ${to})`. */
  describe: (row: string, col: string) => string;
}

function fmtSum(s: number): string {
  return String(Number(s.toPrecision(10)));
}

export function MatrixGrid({ name, caption, rowLabels, colLabels, rows, onChange, issues, describe }: MatrixGridProps) {
  const table = useRef<HTMLTableElement>(null);
  const anyOff = rows.some((r) => rowIsOff(r));

  function focusCell(r: number, c: number) {
    const el = table.current?.querySelector<HTMLInputElement>(`input[data-r="${r}"][data-c="${c}"]`);
    if (el) {
      el.focus();
      el.select();
    }
  }

  function onKeyDown(e: React.KeyboardEvent<HTMLInputElement>, r: number, c: number) {
    const el = e.currentTarget;
    const atStart = el.selectionStart === 0 && (el.selectionEnd === 0 || el.selectionEnd === el.value.length);
    const atEnd = el.selectionEnd === el.value.length;
    let next: [number, number] | null = null;
    if (e.key === "ArrowUp") next = [r - 1, c];
    else if (e.key === "ArrowDown" || (e.key === "Enter" && !e.shiftKey)) next = [r + 1, c];
    else if (e.key === "Enter" && e.shiftKey) next = [r - 1, c];
    else if (e.key === "ArrowLeft" && atStart) next = [r, c - 1];
    else if (e.key === "ArrowRight" && atEnd) next = [r, c + 1];
    if (!next) return;
    e.preventDefault();
    const [nr, nc] = next;
    if (nr >= 0 && nr < rows.length && nc >= 0 && nc < colLabels.length) focusCell(nr, nc);
  }

  function onPaste(e: React.ClipboardEvent<HTMLInputElement>, r: number, c: number) {
    const text = e.clipboardData.getData("text/plain");
    if (!isBlock(text)) return;
    e.preventDefault();
    onChange(pasteBlock(rows, r, c, parseBlock(text)));
  }

  function setCell(r: number, c: number, v: Cell) {
    const next = rows.map((row) => row.slice());
    next[r][c] = v;
    onChange(next);
  }

  return (
    <div className="mt-2">
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <p className="text-sm text-ink-soft" id={`${name}-help`}>
          Arrow keys and Enter move between entries; paste a block copied from a spreadsheet or CSV into any entry to fill from there.
        </p>
        <button type="button" className="btn btn-quiet text-sm" onClick={() => onChange(normaliseAll(rows))} disabled={!anyOff}>
          Normalise all rows
        </button>
      </div>
      <div className="relative overflow-x-auto rounded border border-rule bg-card" role="region" aria-label={caption} tabIndex={-1}>
        <table ref={table} className="ws-grid w-max border-collapse text-sm">
          <caption className="sr-only">{caption}</caption>
          <thead>
            <tr className="bg-paper-deep/60">
              <th scope="col" className="px-2 py-1 text-left text-xs font-semibold text-ink-soft">
                from \ to
              </th>
              {colLabels.map((l, j) => (
                <th key={j} scope="col" className="px-1 py-1 text-left font-mono text-xs font-semibold">
                  {l}
                </th>
              ))}
              <th scope="col" className="px-2 py-1 text-left text-xs font-semibold text-ink-soft">
                row sum
              </th>
            </tr>
          </thead>
          <tbody>
            {rows.map((row, i) => {
              const off = rowIsOff(row);
              const rowIssues = issues.get(`${name}[${i}]`) ?? [];
              const rowErrId = `${name}-row-${i}-error`;
              const cellProblems = row.flatMap((_, j) => {
                const msgs = issues.get(`${name}[${i}][${j}]`) ?? [];
                return msgs.length ? [{ j, msgs }] : [];
              });
              const sum = rowSum(row);
              return (
                <Fragment key={i}>
                  <tr className={`border-t border-rule ${off ? "bg-warn/5" : ""}`}>
                    <th scope="row" className="px-2 py-1 text-left font-mono text-xs font-semibold whitespace-nowrap">
                      {rowLabels[i]}
                    </th>
                    {row.map((v, j) => {
                      const bad = issues.has(`${name}[${i}][${j}]`);
                      const described = [bad ? `${name}-${i}-${j}-error` : null, rowIssues.length ? rowErrId : null].filter(Boolean).join(" ");
                      return (
                        <td key={j} className="px-1 py-1">
                          <CellInput
                            value={v}
                            onValue={(c) => setCell(i, j, c)}
                            data-r={i}
                            data-c={j}
                            aria-label={describe(rowLabels[i], colLabels[j])}
                            aria-invalid={bad || undefined}
                            aria-describedby={described || undefined}
                            onKeyDown={(e) => onKeyDown(e, i, j)}
                            onPaste={(e) => onPaste(e, i, j)}
                            onFocus={(e) => e.currentTarget.select()}
                            className={`w-[5.5rem] px-1.5 py-1 ${bad ? "ws-cell-bad" : ""}`}
                          />
                        </td>
                      );
                    })}
                    <td className="px-2 py-1 whitespace-nowrap">
                      <div className="flex items-center gap-2">
                        <span className={`figures font-mono text-xs ${off ? "font-semibold text-warn" : "text-ok"}`} data-testid={`${name}-rowsum-${i}`}>
                          {sum === null ? (
                            <>
                              <span aria-hidden="true">⚠ </span>
                              <span className="font-sans">no sum</span>
                            </>
                          ) : off ? (
                            <>
                              <span aria-hidden="true">⚠ </span>
                              {fmtSum(sum)} <span className="font-sans">(not 1)</span>
                            </>
                          ) : (
                            <>
                              <span aria-hidden="true">✓ </span>1
                            </>
                          )}
                        </span>
                        <button
                          type="button"
                          className="rounded border border-rule px-1.5 py-0.5 text-xs hover:bg-paper-deep disabled:opacity-50"
                          onClick={() => {
                            const next = rows.slice();
                            next[i] = normaliseRow(row);
                            onChange(next);
                          }}
                          disabled={!off || sum === null || sum <= 0}
                          aria-label={`Normalise row ${rowLabels[i]}`}
                        >
                          Normalise
                        </button>
                      </div>
                    </td>
                  </tr>
                  {(rowIssues.length > 0 || cellProblems.length > 0) && (
                    <tr className="bg-bad/5">
                      <td />
                      <td colSpan={colLabels.length + 1} className="ws-grid-msg px-1 pb-1.5 text-xs text-bad">
                        {cellProblems.map(({ j, msgs }) => (
                          <p key={j} id={`${name}-${i}-${j}-error`}>
                            <span aria-hidden="true">✕ </span>
                            <span className="font-mono font-semibold">{describe(rowLabels[i], colLabels[j])}</span>: {msgs.join("; ")}
                          </p>
                        ))}
                        {rowIssues.length > 0 && (
                          <p id={rowErrId}>
                            <span aria-hidden="true">✕ </span>
                            <span className="font-semibold">Row {rowLabels[i]}</span>: {rowIssues.join("; ")}
                          </p>
                        )}
                      </td>
                    </tr>
                  )}
                </Fragment>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}
