/**
 * The parameters of an edition, family by family: heat-shaded matrices (the number is always printed),
 * the edge list and node weights of a graph walk, the emission table of a hidden source.
 */
import type { ComputeResult } from "~/engine/compute";
import type { Label, ModelParams } from "~/engine/schema";
import { formatParam, formatParamAt, sharedDecimals } from "./format";
import { HEAT_LEGEND, heatColour } from "./heat";

/** Rows printed on paper before the "first rows" note (screen shows all, in a scroll box). */
export const PRINT_ROWS = 12;
/** Columns printed on paper; the row sum printed beside them is still the whole row's. */
export const PRINT_COLS = 12;

const text = (l: Label) => (typeof l === "number" ? String(l) : l);

function sum(xs: readonly number[]): number {
  // Kahan summation: row sums are shown to 12 digits, and naive sums of 24 entries drift in the last ones.
  let s = 0;
  let c = 0;
  for (const x of xs) {
    const y = x - c;
    const t = s + y;
    c = t - s - y;
    s = t;
  }
  return s;
}

/**
 * One number of a parameter table, at the table's shared decimals so the column lines up on its
 * decimal point. An exact zero prints as "0" (a structural zero reads at a glance), padded with
 * invisible decimals so it still lines up.
 */
function Num({ x, d }: { x: number; d: number }) {
  if (x === 0 && d > 0) {
    return (
      <span className="mp-zero">
        0
        <span className="mp-pad" aria-hidden="true">
          .{"0".repeat(d)}
        </span>
      </span>
    );
  }
  return <>{formatParamAt(x, d)}</>;
}

export function HeatLegend({ label, range = "0 → 1" }: { label: string; range?: string }) {
  return (
    <p className="mp-legend mt-2 flex flex-wrap items-center gap-2 text-xs text-ink-soft">
      <span>{label}</span>
      <span className="inline-flex overflow-hidden rounded border border-rule" aria-hidden="true">
        {HEAT_LEGEND.map((s) => (
          <span key={s.t} className="inline-block h-3 w-6" style={{ background: s.colour }} />
        ))}
      </span>
      <span className="font-mono figures">{range}</span>
      <span>(shading only supports the printed numbers)</span>
    </p>
  );
}

/** A labelled matrix with optional row sums; cells shaded by value / scaleMax. */
export function MatrixTable({
  caption,
  corner,
  rowLabels,
  colLabels,
  rows,
  scaleMax = 1,
  rowSums = true,
  id,
}: {
  caption: string;
  corner: string;
  rowLabels: string[];
  colLabels: string[];
  rows: number[][];
  scaleMax?: number;
  rowSums?: boolean;
  id?: string;
}) {
  const large = rows.length > PRINT_ROWS || colLabels.length > PRINT_COLS;
  const d = sharedDecimals(rows.flat());
  return (
    <figure className="mp-matrix" id={id}>
      <div className="mp-scroll card" tabIndex={0} role="region" aria-label={`${caption} (scrolls)`}>
        <table className="mp-table font-mono figures text-xs">
          <caption className="sr-only">{caption}</caption>
          <thead>
            <tr>
              <th scope="col" className="mp-corner font-sans">
                {corner}
              </th>
              {colLabels.map((c, j) => (
                <th key={c} scope="col" className={j >= PRINT_COLS ? "mp-print-extra-col" : undefined}>
                  {c}
                </th>
              ))}
              {rowSums && (
                <th scope="col" className="mp-sum font-sans">
                  row sum
                </th>
              )}
            </tr>
          </thead>
          <tbody>
            {rows.map((r, i) => (
              <tr key={rowLabels[i] ?? i} className={i >= PRINT_ROWS ? "mp-print-extra" : undefined}>
                <th scope="row">{rowLabels[i]}</th>
                {r.map((v, j) => (
                  <td key={j} className={j >= PRINT_COLS ? "mp-print-extra-col" : undefined} style={{ background: heatColour(scaleMax > 0 ? v / scaleMax : 0) }}>
                    <Num x={v} d={d} />
                  </td>
                ))}
                {rowSums && <td className="mp-sum">{formatParam(sum(r))}</td>}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <figcaption className="mt-1 text-sm text-ink-soft">
        {caption}
        {large && (
          <span className="mp-print-only">
            {" "}
            {" "}
            — printed: the first {Math.min(PRINT_ROWS, rows.length)} of {rows.length} rows and {Math.min(PRINT_COLS, colLabels.length)} of {colLabels.length} columns
            {rowSums ? " (row sums over the whole row)" : ""}; the full table is at the permanent URL.
          </span>
        )}
      </figcaption>
    </figure>
  );
}

function VectorTable({ caption, head, labels, values, valueHead }: { caption: string; head: string; labels: string[]; values: number[]; valueHead: string }) {
  // Probabilities are shaded on the same absolute 0–1 scale as the matrices.
  const max = 1;
  const d = sharedDecimals(values);
  return (
    <figure className="mp-matrix">
      <div className="mp-scroll card" tabIndex={0} role="region" aria-label={`${caption} (scrolls)`}>
        <table className="mp-table font-mono figures text-xs">
          <caption className="sr-only">{caption}</caption>
          <thead>
            <tr>
              <th scope="col" className="font-sans">
                {head}
              </th>
              <th scope="col">{valueHead}</th>
            </tr>
          </thead>
          <tbody>
            {labels.map((l, i) => (
              <tr key={l} className={i >= PRINT_ROWS ? "mp-print-extra" : undefined}>
                <th scope="row">{l}</th>
                <td style={{ background: heatColour(max > 0 ? values[i] / max : 0) }}>
                  <Num x={values[i]} d={d} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <figcaption className="mt-1 text-sm text-ink-soft">{caption}</figcaption>
    </figure>
  );
}

function GraphTables({ params }: { params: Extract<ModelParams, { family: "graph-walk" }> }) {
  const nodes = params.nodes.map(text);
  const weight = new Map(nodes.map((n) => [n, 0]));
  for (const [u, v, w] of params.edges) {
    weight.set(text(u), (weight.get(text(u)) ?? 0) + w);
    if (text(u) !== text(v)) weight.set(text(v), (weight.get(text(v)) ?? 0) + w);
  }
  const maxW = Math.max(...params.edges.map((e) => e[2]), 0);
  const maxNode = Math.max(...weight.values(), 0);
  const total = sum(params.edges.map((e) => e[2]));
  const dEdge = sharedDecimals(params.edges.map((e) => e[2]));
  const dNode = sharedDecimals([...weight.values()]);
  return (
    <div className="mp-print-cols grid grid-cols-1 gap-4 lg:grid-cols-[3fr_2fr]">
      <figure className="mp-matrix">
        <div className="mp-scroll card" tabIndex={0} role="region" aria-label="Edge list (scrolls)">
          <table className="mp-table font-mono figures text-xs">
            <caption className="sr-only">Edge list</caption>
            <thead>
              <tr>
                <th scope="col" className="font-sans">
                  node u
                </th>
                <th scope="col" className="mp-left font-sans">
                  node v
                </th>
                <th scope="col">weight w</th>
              </tr>
            </thead>
            <tbody>
              {params.edges.map(([u, v, w], i) => (
                <tr key={i} className={i >= PRINT_ROWS ? "mp-print-extra" : undefined}>
                  <th scope="row">{text(u)}</th>
                  <td className="mp-left">{text(u) === text(v) ? `${text(v)} (self-loop)` : text(v)}</td>
                  <td style={{ background: heatColour(maxW > 0 ? w / maxW : 0) }}>
                    <Num x={w} d={dEdge} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <figcaption className="mt-1 text-sm text-ink-soft">
          Edge list: {params.edges.length} undirected edges, total weight W = <span className="font-mono figures">{formatParam(total)}</span>
          {params.edges.length > PRINT_ROWS && <span className="mp-print-only"> — first {PRINT_ROWS} edges printed.</span>}
        </figcaption>
      </figure>
      <figure className="mp-matrix">
        <div className="mp-scroll card" tabIndex={0} role="region" aria-label="Node weights (scrolls)">
          <table className="mp-table font-mono figures text-xs">
            <caption className="sr-only">Node weights</caption>
            <thead>
              <tr>
                <th scope="col" className="font-sans">
                  node
                </th>
                <th scope="col">weight Wᵢ</th>
              </tr>
            </thead>
            <tbody>
              {nodes.map((n, i) => (
                <tr key={n} className={i >= PRINT_ROWS ? "mp-print-extra" : undefined}>
                  <th scope="row">{n}</th>
                  <td style={{ background: heatColour(maxNode > 0 ? (weight.get(n) ?? 0) / maxNode : 0) }}>
                    <Num x={weight.get(n) ?? 0} d={dNode} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <figcaption className="mt-1 text-sm text-ink-soft">
          Node weights Wᵢ: the sum of the weights of the edges at node i (a self-loop counts once).
          {nodes.length > PRINT_ROWS && <span className="mp-print-only"> First {PRINT_ROWS} of {nodes.length} nodes printed.</span>}
        </figcaption>
      </figure>
    </div>
  );
}

/** The parameter tables of any family. */
export function Parameters({ params, figures }: { params: ModelParams; figures: ComputeResult }) {
  switch (params.family) {
    case "iid": {
      const labels = params.alphabet.map(text);
      return (
        <>
          <VectorTable caption={`Symbol probabilities p over ${labels.length} symbols (sum ${formatParam(sum(params.p))}).`} head="symbol" labels={labels} values={params.p} valueHead="p" />
          <HeatLegend label="Cell shading, by probability:" />
        </>
      );
    }
    case "two-state": {
      const [s0, s1] = params.alphabet.map(text);
      return (
        <>
          <dl className="mp-scalars card figures">
            <div>
              <dt>
                a = P({s0} → {s1})
              </dt>
              <dd className="font-mono">{formatParam(params.a)}</dd>
            </div>
            <div>
              <dt>
                b = P({s1} → {s0})
              </dt>
              <dd className="font-mono">{formatParam(params.b)}</dd>
            </div>
          </dl>
          <div className="mt-4">
            <MatrixTable
              caption="The transition matrix these two numbers define (rows: current state, columns: next state)."
              corner="from ↓ to →"
              rowLabels={[s0, s1]}
              colLabels={[s0, s1]}
              rows={[
                [1 - params.a, params.a],
                [params.b, 1 - params.b],
              ]}
            />
          </div>
        </>
      );
    }
    case "markov": {
      const symbols = params.alphabet.map(text);
      const order = params.order ?? 1;
      if (params.transitions) {
        const rows = params.transitions;
        const d = sharedDecimals(rows.map((t) => t[2]));
        return (
          <figure className="mp-matrix">
            <div className="mp-scroll card" tabIndex={0} role="region" aria-label="Transitions (scrolls)">
              <table className="mp-table font-mono figures text-xs">
                <caption className="sr-only">Positive transitions</caption>
                <thead>
                  <tr>
                    <th scope="col" className="font-sans">
                      from
                    </th>
                    <th scope="col" className="mp-left font-sans">
                      to
                    </th>
                    <th scope="col">P</th>
                  </tr>
                </thead>
                <tbody>
                  {rows.map(([i, j, p], k) => (
                    <tr key={k} className={k >= PRINT_ROWS ? "mp-print-extra" : undefined}>
                      <th scope="row">{symbols[i]}</th>
                      <td className="mp-left">{symbols[j]}</td>
                      <td style={{ background: heatColour(p) }}>
                        <Num x={p} d={d} />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <figcaption className="mt-1 text-sm text-ink-soft">{rows.length} positive transitions (sparse form); omitted pairs have probability 0.</figcaption>
          </figure>
        );
      }
      const rowLabels = order === 1 ? symbols : figures.states;
      return (
        <>
          <MatrixTable
            caption={
              order === 1
                ? `Transition matrix P, ${symbols.length} × ${symbols.length} (rows: current symbol, columns: next symbol).`
                : `Order-${order} transition matrix: ${rowLabels.length} contexts × ${symbols.length} next symbols. A context reads oldest symbol first (a·b: a, then b most recent).`
            }
            corner={order === 1 ? "from ↓ to →" : "context ↓ next →"}
            rowLabels={rowLabels}
            colLabels={symbols}
            rows={params.P ?? []}
          />
          <HeatLegend label="Cell shading, by probability:" />
        </>
      );
    }
    case "graph-walk":
      return (
        <>
          <GraphTables params={params} />
          <HeatLegend label="Cell shading, by weight relative to the largest:" range="0 → largest" />
        </>
      );
    case "hidden": {
      const states = params.states.map(text);
      const symbols = params.alphabet.map(text);
      return (
        <>
          <div className="mp-print-cols grid grid-cols-1 gap-4 lg:grid-cols-2">
            <MatrixTable caption={`Hidden-state transition matrix P, ${states.length} × ${states.length}.`} corner="from ↓ to →" rowLabels={states} colLabels={states} rows={params.P} />
            <MatrixTable
              caption={`Emission table B: probability of each emitted symbol in each hidden state (${states.length} × ${symbols.length}).`}
              corner="state ↓ symbol →"
              rowLabels={states}
              colLabels={symbols}
              rows={params.B}
            />
          </div>
          <HeatLegend label="Cell shading, by probability:" />
        </>
      );
    }
  }
}
