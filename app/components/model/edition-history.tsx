/**
 * Every edition of the model with its status, and the comparison of any two: a GET form (two selects)
 * that works without JavaScript, parameter by parameter and figure by figure.
 */
import { Form } from "react-router";
import type { ModelPageData, ModelPageDiff } from "~/.server/model-page.server";
import { fromBits, unitLabel, useUnits } from "~/units";
import type { FigureDelta, ParamCell, ParamChange } from "./diff";
import { formatDate, formatDelta, formatFixed, formatParam } from "./format";

function statusOf(page: ModelPageData, n: number, retracted: boolean): string {
  if (retracted) return "retracted";
  return n === page.currentNumber ? "current" : "superseded";
}

export function EditionHistory({ page }: { page: ModelPageData }) {
  const { unit } = useUnits();
  const u = unitLabel(unit);
  return (
    <div className="card overflow-x-auto" tabIndex={0} role="region" aria-label="Edition history (scrolls sideways on narrow screens)">
      <table className="mp-history w-full text-left text-sm figures">
        <caption className="sr-only">Editions of this model, oldest first</caption>
        <thead>
          <tr>
            <th scope="col">Edition</th>
            <th scope="col" className="text-right">
              Entropy rate ({u})
            </th>
            <th scope="col">Status</th>
            <th scope="col">Published</th>
            <th scope="col">Note</th>
          </tr>
        </thead>
        <tbody>
          {page.editions.map((e) => {
            const status = statusOf(page, e.number, Boolean(e.retractedAt));
            const here = e.number === page.edition.number;
            return (
              <tr key={e.number} aria-current={here ? "page" : undefined} className={here ? "mp-here" : undefined}>
                <th scope="row" className="font-mono">
                  <a href={`/library/${page.model.slug}/e/${e.number}`}>
                    {e.number}
                    <span className="sr-only"> (permanent link)</span>
                  </a>
                  {here && <span className="ml-1 font-sans text-xs text-ink-soft">(shown)</span>}
                </th>
                <td className="text-right font-mono">{formatFixed(fromBits(e.entropyRateBits, unit), 6)}</td>
                <td>
                  <span className={`mp-pill mp-pill-${status}`}>
                    {status === "retracted" ? "⚠ " : status === "current" ? "● " : "○ "}
                    {status}
                  </span>
                  {e.retractedAt && <span className="block text-xs text-ink-soft">on {formatDate(e.retractedAt)}</span>}
                </td>
                <td className="whitespace-nowrap font-mono">{formatDate(e.publishedAt)}</td>
                <td className="mp-note">{e.note}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

function ChangeValue({ c }: { c: ParamChange }) {
  if (c.kind === "added") return <>added: {formatParam(c.to!)}</>;
  if (c.kind === "removed") return <>removed (was {formatParam(c.from!)})</>;
  return (
    <>
      {formatParam(c.from!)} → {formatParam(c.to!)}
    </>
  );
}

const tableNames: Record<ParamCell["table"], string> = {
  p: "symbol probabilities p",
  P: "transition matrix P",
  B: "emission table B",
  edges: "edge weights",
  scalar: "parameters",
};

/** The newer edition's matrix with changed cells outlined and marked ◆, showing old → new. */
function OutlinedMatrix({ cells, changes, table }: { cells: ParamCell[]; changes: Map<string, ParamChange>; table: "P" | "B" | "p" }) {
  const mine = cells.filter((c) => c.table === table);
  if (!mine.length) return null;
  const rows = [...new Set(mine.map((c) => c.row))];
  const cols = [...new Set(mine.map((c) => c.col))];
  const at = new Map(mine.map((c) => [`${c.row}|${c.col}`, c]));
  return (
    <div className="mp-scroll card mt-2" tabIndex={0} role="region" aria-label={`${tableNames[table]} with changes marked (scrolls)`}>
      <table className="mp-table font-mono figures text-xs">
        <caption className="sr-only">{tableNames[table]} of the newer edition; changed cells are outlined and marked with ◆</caption>
        <thead>
          <tr>
            <th scope="col" className="font-sans">
              {table === "p" ? "symbol" : "row ↓ column →"}
            </th>
            {cols.map((c) => (
              <th key={c} scope="col">
                {c}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r}>
              <th scope="row">{r}</th>
              {cols.map((c) => {
                const cell = at.get(`${r}|${c}`);
                const ch = cell ? changes.get(cell.key) : undefined;
                return (
                  <td key={c} className={ch ? "mp-changed" : undefined}>
                    {ch ? (
                      <>
                        <span aria-label="changed">◆ </span>
                        <ChangeValue c={ch} />
                      </>
                    ) : cell ? (
                      formatParam(cell.value)
                    ) : (
                      "—"
                    )}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function FigureRow({ f, unit }: { f: FigureDelta; unit: "bits" | "nats" }) {
  const conv = (x: number | null) => (f.kind === "rate" ? fromBits(x, unit) : x);
  return (
    <tr className={f.changed ? "mp-row-changed" : undefined}>
      <th scope="row" className="font-sans">
        {f.changed ? <span aria-label="changed">◆ </span> : <span aria-label="unchanged">= </span>}
        {f.figure}
      </th>
      <td>{formatFixed(conv(f.from), 9)}</td>
      <td>{formatFixed(conv(f.to), 9)}</td>
      <td>{f.changed ? formatDelta(conv(f.delta), 9) : "0"}</td>
    </tr>
  );
}

export function EditionDiffView({ page, diff }: { page: ModelPageData; diff: ModelPageDiff }) {
  const { unit } = useUnits();
  const u = unitLabel(unit);
  const r = diff.result;
  const changes = new Map((r?.params.changes ?? []).map((c) => [c.key, c]));
  const hasMatrix = (t: "P" | "B" | "p") => (diff.toCells ?? []).some((c) => c.table === t) && r?.params.sameStructure;
  return (
    <div>
      <Form method="get" preventScrollReset className="mp-diff-form flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="diff-from" className="block text-sm font-semibold">
            Compare edition
          </label>
          <select id="diff-from" name="from" defaultValue={diff.from} className="field mt-1 w-auto font-mono">
            {page.editions.map((e) => (
              <option key={e.number} value={e.number}>
                {e.number}
                {e.retractedAt ? " (retracted)" : ""}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="diff-to" className="block text-sm font-semibold">
            with edition
          </label>
          <select id="diff-to" name="to" defaultValue={diff.to} className="field mt-1 w-auto font-mono">
            {page.editions.map((e) => (
              <option key={e.number} value={e.number}>
                {e.number}
                {e.retractedAt ? " (retracted)" : ""}
              </option>
            ))}
          </select>
        </div>
        <button type="submit" className="btn btn-quiet">
          Compare
        </button>
      </Form>
      {diff.notice && (
        <p className="mt-2 text-sm text-warn" role="status">
          {diff.notice}
        </p>
      )}
      {r && (
        <div className="mt-4 space-y-4" aria-live="polite">
          <section aria-labelledby="diff-params-title">
            <h3 id="diff-params-title" className="text-base font-bold">
              Parameters: edition {r.from} → edition {r.to}
            </h3>
            {r.params.structure.map((s) => (
              <p key={s} className="text-sm">
                Structure: {s}.
              </p>
            ))}
            {r.params.changes.length === 0 ? (
              <p className="text-sm">No parameter changed ({r.params.unchanged} compared).</p>
            ) : (
              <>
                <p className="text-sm text-ink-soft">
                  {r.params.changes.length} of {r.params.changes.length + r.params.unchanged} parameters differ; changed ones are marked ◆ and outlined.
                </p>
                <div className="mp-scroll mp-scroll-short card mt-2" tabIndex={0} role="region" aria-label="Changed parameters (scrolls)">
                  <table className="mp-table mp-diff-list figures text-xs" data-testid="param-changes">
                    <caption className="sr-only">Changed parameters</caption>
                    <thead>
                      <tr>
                        <th scope="col">Parameter</th>
                        <th scope="col">Edition {r.from} → {r.to}</th>
                        <th scope="col">Change</th>
                      </tr>
                    </thead>
                    <tbody>
                      {r.params.changes.map((c) => (
                        <tr key={c.key} className="mp-row-changed">
                          <th scope="row" className="font-sans">
                            <span aria-hidden="true">◆ </span>
                            {c.table === "scalar" ? c.row : c.table === "edges" ? `edge ${c.row}` : c.table === "p" ? `p(${c.row})` : `${c.table}[${c.row} → ${c.col}]`}
                          </th>
                          <td className="mp-changed font-mono">
                            <ChangeValue c={c} />
                          </td>
                          <td className="font-mono">{formatDelta(c.delta, 6)}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
                {(["P", "B", "p"] as const).filter(hasMatrix).map((t) => (
                  <div key={t} className="mt-3">
                    <p className="text-sm font-semibold">{tableNames[t]}, edition {r.to}</p>
                    <OutlinedMatrix cells={diff.toCells!} changes={changes} table={t} />
                  </div>
                ))}
              </>
            )}
          </section>
          <section aria-labelledby="diff-figures-title">
            <h3 id="diff-figures-title" className="text-base font-bold">
              Figures: edition {r.from} → edition {r.to}
            </h3>
            <p className="text-xs text-ink-soft">Rates in {u}; stationary probabilities unitless. ◆ marks a figure that changed, = one that did not.</p>
            <div className="mp-scroll mp-scroll-short card mt-2" tabIndex={0} role="region" aria-label="Figure changes (scrolls)">
              <table className="mp-table mp-diff-list font-mono figures text-xs" data-testid="figure-changes">
                <caption className="sr-only">Figures of both editions and their differences</caption>
                <thead>
                  <tr>
                    <th scope="col" className="font-sans">
                      Figure
                    </th>
                    <th scope="col">Edition {r.from}</th>
                    <th scope="col">Edition {r.to}</th>
                    <th scope="col">Difference</th>
                  </tr>
                </thead>
                <tbody>
                  {r.figures.map((f) => (
                    <FigureRow key={f.key} f={f} unit={unit} />
                  ))}
                </tbody>
              </table>
            </div>
          </section>
        </div>
      )}
    </div>
  );
}
