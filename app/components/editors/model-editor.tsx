/**
 * The family editors: matrix grids for Markov chains (order 1 and k) and hidden sources, an edge list
 * for graph walks, small forms for two-state chains and i.i.d. sources, and a JSON editor for models
 * the grids cannot show. Each works on a Draft and reports the next Draft.
 */
import { useState } from "react";
import { LIMITS } from "~/engine";
import type { Draft, GraphDraft, HiddenDraft, IidDraft, JsonDraft, MarkovDraft, TwoStateDraft } from "./draft";
import { GRID_CELL_LIMIT } from "./draft";
import {
  contextRowLabels,
  contextSources,
  freshLabel,
  normaliseRow,
  parseEdgeCsv,
  remapMatrix,
  renormaliseKeptRows,
  rowIsOff,
  rowSum,
  sourcesAfterAdd,
  sourcesAfterRemove,
  type Cell,
} from "./grid-ops";
import { CellInput, MatrixGrid } from "./matrix-grid";

type Issues = Map<string, string[]>;

function FieldError({ id, messages }: { id: string; messages: string[] | undefined }) {
  if (!messages?.length) return null;
  return (
    <p id={id} className="mt-1 text-xs text-bad">
      <span aria-hidden="true">✕ </span>
      {messages.join("; ")}
    </p>
  );
}

/** Editable labels with add, rename and remove; removal is refused below `min` entries. */
function LabelList({
  name,
  legend,
  labels,
  issues,
  min,
  max,
  onRename,
  onAdd,
  onRemove,
  addText,
}: {
  name: string;
  legend: string;
  labels: string[];
  issues: Issues;
  min: number;
  max: number;
  onRename: (i: number, label: string) => void;
  onAdd: () => void;
  onRemove: (i: number) => void;
  addText: string;
}) {
  const listIssues = issues.get(name);
  return (
    <fieldset className="mt-3">
      <legend className="text-sm font-semibold">{legend}</legend>
      <ul className="mt-1 flex flex-wrap gap-2">
        {labels.map((l, i) => {
          const errs = issues.get(`${name}[${i}]`);
          return (
            <li key={i} className="flex items-start gap-1">
              <div>
                <label className="sr-only" htmlFor={`${name}-${i}`}>
                  {legend} {i + 1}
                </label>
                <input
                  id={`${name}-${i}`}
                  className="field w-28 px-2 py-1 font-mono text-sm"
                  value={l}
                  onChange={(e) => onRename(i, e.target.value)}
                  aria-invalid={errs ? true : undefined}
                  aria-describedby={errs ? `${name}-${i}-error` : undefined}
                />
                <FieldError id={`${name}-${i}-error`} messages={errs} />
              </div>
              <button
                type="button"
                className="mt-1 rounded border border-rule px-1.5 text-sm leading-6 hover:bg-paper-deep disabled:opacity-40"
                onClick={() => onRemove(i)}
                disabled={labels.length <= min}
                aria-label={`Remove ${l || `entry ${i + 1}`}`}
              >
                ×
              </button>
            </li>
          );
        })}
        <li>
          <button type="button" className="btn btn-quiet text-sm" onClick={onAdd} disabled={labels.length >= max}>
            + {addText}
          </button>
        </li>
      </ul>
      <FieldError id={`${name}-error`} messages={listIssues} />
    </fieldset>
  );
}

function MarkovEditor({ d, onChange, issues }: { d: MarkovDraft; onChange: (d: Draft) => void; issues: Issues }) {
  const m = d.alphabet.length;
  const maxSymbols = Math.floor(Math.pow(GRID_CELL_LIMIT, 1 / (d.order + 1)));
  const rowLabels = d.order === 1 ? d.alphabet : contextRowLabels(d.alphabet, d.order);
  const remap = (symbolSource: number[], alphabet: string[], order = d.order, oldOrder = d.order) => {
    const rowsSrc = order === oldOrder ? contextSources(symbolSource, m, order) : new Array<number>(alphabet.length ** order).fill(-1);
    const P = remapMatrix(d.P, rowsSrc, symbolSource);
    // Removing a symbol drops its column: rows that summed to 1 are rescaled so they still do.
    onChange({ ...d, alphabet, order, P: symbolSource.length < m ? renormaliseKeptRows(P, rowsSrc, d.P) : P });
  };
  return (
    <div>
      <LabelList
        name="alphabet"
        legend={d.order === 1 ? "States (the alphabet)" : "Alphabet"}
        labels={d.alphabet}
        issues={issues}
        min={1}
        max={maxSymbols}
        addText={d.order === 1 ? "Add state" : "Add symbol"}
        onRename={(i, l) => onChange({ ...d, alphabet: d.alphabet.map((x, k) => (k === i ? l : x)) })}
        onAdd={() => remap(sourcesAfterAdd(m), [...d.alphabet, freshLabel(d.alphabet, "s")])}
        onRemove={(i) => remap(sourcesAfterRemove(m, i), d.alphabet.filter((_, k) => k !== i))}
      />
      <div className="mt-3">
        <label htmlFor="markov-order" className="text-sm font-semibold">
          Order k
        </label>
        <select
          id="markov-order"
          className="field mt-1 w-auto py-1"
          value={d.order}
          aria-describedby="markov-order-help"
          onChange={(e) => {
            const order = Number(e.target.value);
            remap(
              Array.from({ length: m }, (_, i) => i),
              d.alphabet,
              order,
              d.order,
            );
          }}
        >
          {Array.from({ length: Math.min(LIMITS.order, 6) }, (_, i) => i + 1)
            .filter((k) => m ** (k + 1) <= GRID_CELL_LIMIT || k === d.order)
            .map((k) => (
              <option key={k} value={k}>
                {k}
              </option>
            ))}
        </select>
        <p id="markov-order-help" className="mt-1 text-xs text-ink-soft">
          {d.order === 1
            ? "Each row is the current state."
            : `Each row is a context of the last ${d.order} symbols (${rowLabels.length} rows, lexicographic). Changing the order starts every row uniform.`}
        </p>
      </div>
      <h3 className="mt-4 text-sm font-semibold">Transition matrix P</h3>
      <MatrixGrid
        name="P"
        caption={d.order === 1 ? "Transition matrix P: row = current state, column = next state" : `Transition matrix P: row = context, column = next symbol`}
        rowLabels={rowLabels}
        colLabels={d.alphabet}
        rows={d.P}
        onChange={(P) => onChange({ ...d, P })}
        issues={issues}
        describe={(r, c) => `P(${r} → ${c})`}
      />
      <FieldError id="P-error" messages={issues.get("P")} />
    </div>
  );
}

function HiddenEditor({ d, onChange, issues }: { d: HiddenDraft; onChange: (d: Draft) => void; issues: Issues }) {
  const n = d.states.length;
  const k = d.alphabet.length;
  const ident = (len: number) => Array.from({ length: len }, (_, i) => i);
  // Removing a state or a symbol drops a column: rows that summed to 1 are rescaled so they still do.
  const changeStates = (src: number[], states: string[]) => {
    const P = remapMatrix(d.P, src, src);
    onChange({ ...d, states, P: src.length < n ? renormaliseKeptRows(P, src, d.P) : P, B: remapMatrix(d.B, src, ident(k)) });
  };
  const changeSymbols = (src: number[], alphabet: string[]) => {
    const B = remapMatrix(d.B, ident(n), src);
    onChange({ ...d, alphabet, B: src.length < k ? renormaliseKeptRows(B, ident(n), d.B) : B });
  };
  return (
    <div>
      <LabelList
        name="states"
        legend="Hidden states"
        labels={d.states}
        issues={issues}
        min={1}
        max={64}
        addText="Add state"
        onRename={(i, l) => onChange({ ...d, states: d.states.map((x, j) => (j === i ? l : x)) })}
        onAdd={() => changeStates(sourcesAfterAdd(n), [...d.states, freshLabel(d.states, "h")])}
        onRemove={(i) => changeStates(sourcesAfterRemove(n, i), d.states.filter((_, j) => j !== i))}
      />
      <LabelList
        name="alphabet"
        legend="Output symbols"
        labels={d.alphabet}
        issues={issues}
        min={1}
        max={LIMITS.hiddenSymbols}
        addText="Add symbol"
        onRename={(i, l) => onChange({ ...d, alphabet: d.alphabet.map((x, j) => (j === i ? l : x)) })}
        onAdd={() => changeSymbols(sourcesAfterAdd(k), [...d.alphabet, freshLabel(d.alphabet, "y")])}
        onRemove={(i) => changeSymbols(sourcesAfterRemove(k, i), d.alphabet.filter((_, j) => j !== i))}
      />
      <h3 className="mt-4 text-sm font-semibold">Hidden-state transitions P</h3>
      <MatrixGrid name="P" caption="Hidden-state transition matrix P: row = current state, column = next state" rowLabels={d.states} colLabels={d.states} rows={d.P} onChange={(P) => onChange({ ...d, P })} issues={issues} describe={(r, c) => `P(${r} → ${c})`} />
      <FieldError id="P-error" messages={issues.get("P")} />
      <h3 className="mt-4 text-sm font-semibold">Emissions B</h3>
      <MatrixGrid name="B" caption="Emission matrix B: row = hidden state, column = emitted symbol" rowLabels={d.states} colLabels={d.alphabet} rows={d.B} onChange={(B) => onChange({ ...d, B })} issues={issues} describe={(r, c) => `B(${r} emits ${c})`} />
      <FieldError id="B-error" messages={issues.get("B")} />
    </div>
  );
}

function ProbabilityField({ id, label, value, onValue, issues, help }: { id: string; label: string; value: Cell; onValue: (c: Cell) => void; issues: string[] | undefined; help: string }) {
  return (
    <div>
      <label htmlFor={id} className="text-sm font-semibold">
        {label}
      </label>
      <CellInput
        id={id}
        value={value}
        onValue={onValue}
        className="mt-1 w-32"
        aria-invalid={issues ? true : undefined}
        aria-describedby={[`${id}-help`, issues ? `${id}-error` : ""].filter(Boolean).join(" ")}
      />
      <p id={`${id}-help`} className="mt-1 text-xs text-ink-soft">
        {help}
      </p>
      <FieldError id={`${id}-error`} messages={issues} />
    </div>
  );
}

function TwoStateEditor({ d, onChange, issues }: { d: TwoStateDraft; onChange: (d: Draft) => void; issues: Issues }) {
  const [s0 = "", s1 = ""] = d.alphabet;
  return (
    <div className="mt-3 grid gap-4 sm:grid-cols-2">
      {[0, 1].map((i) => (
        <div key={i}>
          <label htmlFor={`alphabet-${i}`} className="text-sm font-semibold">
            State {i} label
          </label>
          <input
            id={`alphabet-${i}`}
            className="field mt-1 font-mono text-sm"
            value={d.alphabet[i] ?? ""}
            onChange={(e) => onChange({ ...d, alphabet: d.alphabet.map((x, j) => (j === i ? e.target.value : x)) })}
            aria-invalid={issues.get(`alphabet[${i}]`) ? true : undefined}
            aria-describedby={issues.get(`alphabet[${i}]`) ? `alphabet-${i}-error` : undefined}
          />
          <FieldError id={`alphabet-${i}-error`} messages={issues.get(`alphabet[${i}]`)} />
        </div>
      ))}
      <ProbabilityField id="two-state-a" label={`a = P(${s0} → ${s1})`} value={d.a} onValue={(a) => onChange({ ...d, a })} issues={issues.get("a")} help={`Probability of leaving ${s0 || "state 0"} in one step.`} />
      <ProbabilityField id="two-state-b" label={`b = P(${s1} → ${s0})`} value={d.b} onValue={(b) => onChange({ ...d, b })} issues={issues.get("b")} help={`Probability of leaving ${s1 || "state 1"} in one step.`} />
      <FieldError id="alphabet-error" messages={issues.get("alphabet")} />
    </div>
  );
}

function IidEditor({ d, onChange, issues }: { d: IidDraft; onChange: (d: Draft) => void; issues: Issues }) {
  const sum = rowSum(d.p);
  const off = rowIsOff(d.p);
  return (
    <div className="mt-3">
      <table className="border-collapse text-sm">
        <caption className="sr-only">Symbols and their probabilities</caption>
        <thead>
          <tr className="border-b border-rule text-left text-xs text-ink-soft">
            <th scope="col" className="py-1 pr-2">Symbol</th>
            <th scope="col" className="py-1 pr-2">Probability</th>
            <th scope="col" className="py-1"><span className="sr-only">Remove</span></th>
          </tr>
        </thead>
        <tbody>
          {d.alphabet.map((s, i) => (
            <tr key={i} className="border-b border-rule/60 align-top">
              <td className="py-1 pr-2">
                <input
                  className="field w-40 max-w-full px-2 py-1 font-mono text-sm"
                  aria-label={`Symbol ${i + 1}`}
                  value={s}
                  onChange={(e) => onChange({ ...d, alphabet: d.alphabet.map((x, j) => (j === i ? e.target.value : x)) })}
                  aria-invalid={issues.get(`alphabet[${i}]`) ? true : undefined}
                  aria-describedby={issues.get(`alphabet[${i}]`) ? `alphabet-${i}-error` : undefined}
                />
                <FieldError id={`alphabet-${i}-error`} messages={issues.get(`alphabet[${i}]`)} />
              </td>
              <td className="py-1 pr-2">
                <CellInput
                  aria-label={`Probability of ${s || `symbol ${i + 1}`}`}
                  value={d.p[i] ?? ""}
                  onValue={(c) => onChange({ ...d, p: d.p.map((x, j) => (j === i ? c : x)) })}
                  className="w-28 px-2 py-1"
                  aria-invalid={issues.get(`p[${i}]`) ? true : undefined}
                  aria-describedby={issues.get(`p[${i}]`) ? `p-${i}-error` : undefined}
                />
                <FieldError id={`p-${i}-error`} messages={issues.get(`p[${i}]`)} />
              </td>
              <td className="py-1">
                <button
                  type="button"
                  className="mt-1 rounded border border-rule px-1.5 leading-6 hover:bg-paper-deep disabled:opacity-40"
                  disabled={d.alphabet.length <= 1}
                  onClick={() => {
                    const p = d.p.filter((_, j) => j !== i);
                    // A distribution that summed to 1 is rescaled so it still does without the removed symbol.
                    onChange({ ...d, alphabet: d.alphabet.filter((_, j) => j !== i), p: rowIsOff(d.p) ? p : normaliseRow(p) });
                  }}
                  aria-label={`Remove ${s || `symbol ${i + 1}`}`}
                >
                  ×
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <div className="mt-2 flex flex-wrap items-center gap-3">
        <button type="button" className="btn btn-quiet text-sm" onClick={() => onChange({ ...d, alphabet: [...d.alphabet, freshLabel(d.alphabet, "x")], p: [...d.p, 0] })}>
          + Add symbol
        </button>
        <button type="button" className="btn btn-quiet text-sm" disabled={!off} onClick={() => onChange({ ...d, p: normaliseRow(d.p) })}>
          Normalise
        </button>
        <span className={`figures font-mono text-sm ${off ? "font-semibold text-warn" : "text-ok"}`} data-testid="p-sum">
          <span aria-hidden="true">{off ? "⚠ " : "✓ "}</span>sum {sum === null ? "not a number" : String(Number(sum.toPrecision(10)))}
          {off ? <span className="font-sans"> (not 1)</span> : null}
        </span>
      </div>
      <FieldError id="p-error" messages={issues.get("p")} />
    </div>
  );
}

function GraphEditor({ d, onChange, issues }: { d: GraphDraft; onChange: (d: Draft) => void; issues: Issues }) {
  const [csv, setCsv] = useState("");
  const [csvProblems, setCsvProblems] = useState<string[]>([]);
  const setEdge = (i: number, k: 0 | 1 | 2, v: string | Cell) =>
    onChange({ ...d, edges: d.edges.map((e, j) => (j === i ? (Object.assign(e.slice(), { [k]: v }) as GraphDraft["edges"][number]) : e)) });
  return (
    <div>
      <LabelList
        name="nodes"
        legend="Nodes"
        labels={d.nodes}
        issues={issues}
        min={1}
        max={4096}
        addText="Add node"
        onRename={(i, l) => {
          const old = d.nodes[i];
          onChange({
            ...d,
            nodes: d.nodes.map((x, j) => (j === i ? l : x)),
            edges: d.edges.map(([u, v, w]) => [u === old ? l : u, v === old ? l : v, w]),
          });
        }}
        onAdd={() => onChange({ ...d, nodes: [...d.nodes, freshLabel(d.nodes, "n")] })}
        onRemove={(i) => {
          const gone = d.nodes[i];
          onChange({ ...d, nodes: d.nodes.filter((_, j) => j !== i), edges: d.edges.filter(([u, v]) => u !== gone && v !== gone) });
        }}
      />
      <h3 className="mt-4 text-sm font-semibold">Edges (undirected; a self-loop adds its weight once)</h3>
      <div className="relative mt-1 overflow-x-auto">
        <table className="border-collapse text-sm">
          <caption className="sr-only">Edges: node, node, weight</caption>
          <thead>
            <tr className="border-b border-rule text-left text-xs text-ink-soft">
              <th scope="col" className="py-1 pr-2">#</th>
              <th scope="col" className="py-1 pr-2">Node u</th>
              <th scope="col" className="py-1 pr-2">Node v</th>
              <th scope="col" className="py-1 pr-2">Weight w</th>
              <th scope="col"><span className="sr-only">Remove</span></th>
            </tr>
          </thead>
          <tbody>
            {d.edges.map(([u, v, w], i) => {
              const errs = [...(issues.get(`edges[${i}]`) ?? []), ...(issues.get(`edges[${i}][0]`) ?? []), ...(issues.get(`edges[${i}][1]`) ?? []), ...(issues.get(`edges[${i}][2]`) ?? [])];
              const errId = `edges-${i}-error`;
              const nodeOptions = (current: string) => (d.nodes.includes(current) ? d.nodes : [current, ...d.nodes]);
              return (
                <tr key={i} className="border-b border-rule/60 align-top">
                  <td className="figures py-1 pt-2.5 pr-2 font-mono text-xs text-ink-soft">{i}</td>
                  {([0, 1] as const).map((k) => (
                    <td key={k} className="py-1 pr-2">
                      <select
                        className="field w-[6.5rem] px-1.5 py-1 font-mono text-sm sm:w-32"
                        aria-label={`Edge ${i}, node ${k === 0 ? "u" : "v"}`}
                        value={k === 0 ? u : v}
                        onChange={(e) => setEdge(i, k, e.target.value)}
                        aria-invalid={errs.length ? true : undefined}
                        aria-describedby={errs.length ? errId : undefined}
                      >
                        {nodeOptions(k === 0 ? u : v).map((n) => (
                          <option key={n} value={n}>
                            {n}
                          </option>
                        ))}
                      </select>
                    </td>
                  ))}
                  <td className="py-1 pr-2">
                    <CellInput
                      aria-label={`Edge ${i}, weight`}
                      value={w}
                      onValue={(c) => setEdge(i, 2, c)}
                      className="w-20 px-1.5 py-1 sm:w-24"
                      aria-invalid={errs.length ? true : undefined}
                      aria-describedby={errs.length ? errId : undefined}
                    />
                    {errs.length > 0 && (
                      <p id={errId} className="mt-0.5 max-w-[16rem] text-xs text-bad">
                        {errs.join("; ")}
                      </p>
                    )}
                  </td>
                  <td className="py-1">
                    <button type="button" className="mt-1 rounded border border-rule px-1.5 leading-6 hover:bg-paper-deep" onClick={() => onChange({ ...d, edges: d.edges.filter((_, j) => j !== i) })} aria-label={`Remove edge ${i}`}>
                      ×
                    </button>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <FieldError id="edges-error" messages={issues.get("edges")} />
      <button type="button" className="btn btn-quiet mt-2 text-sm" onClick={() => onChange({ ...d, edges: [...d.edges, [d.nodes[0] ?? "", d.nodes[1] ?? d.nodes[0] ?? "", 1]] })}>
        + Add edge
      </button>
      <details className="mt-3 rounded border border-rule bg-paper-deep/30 p-3">
        <summary className="cursor-pointer text-sm font-semibold">Import edges from CSV</summary>
        <label htmlFor="edge-csv" className="mt-2 block text-sm">
          One edge per line as <code>u,v,w</code> (comma, tab or semicolon; a header line and <code>#</code> comments are skipped); new node names are added to the
          node list.
        </label>
        <textarea
          id="edge-csv"
          className="field mt-1 h-28 font-mono text-sm"
          value={csv}
          placeholder={"dock,aisle-1,3\naisle-1,charger,0.5"}
          onChange={(e) => setCsv(e.target.value)}
          aria-describedby={csvProblems.length ? "edge-csv-error" : undefined}
        />
        <div className="mt-2">
          <label htmlFor="edge-csv-file" className="text-sm">
            or read a CSV file into the box:
          </label>{" "}
          <input
            id="edge-csv-file"
            type="file"
            accept=".csv,.tsv,.txt,text/csv,text/plain"
            className="text-sm"
            onChange={async (e) => {
              const file = e.target.files?.[0];
              if (!file) return;
              if (file.size > 5 * 1024 * 1024) {
                setCsvProblems([`${file.name} is ${(file.size / 1024 / 1024).toFixed(1)} MB; the editor reads edge files of up to 5 MB`]);
                return;
              }
              setCsv(await file.text());
              setCsvProblems([]);
            }}
          />
        </div>
        <button
          type="button"
          className="btn btn-quiet mt-2 text-sm"
          onClick={() => {
            const { edges, problems } = parseEdgeCsv(csv);
            setCsvProblems(problems);
            if (problems.length) return;
            const nodes = d.nodes.slice();
            for (const [u, v] of edges) for (const x of [u, v]) if (!nodes.includes(x)) nodes.push(x);
            onChange({ ...d, nodes, edges: [...d.edges, ...edges] });
            setCsv("");
          }}
        >
          Add these edges
        </button>
        {csvProblems.length > 0 && (
          <ul id="edge-csv-error" className="mt-2 list-disc pl-5 text-xs text-bad" role="alert">
            {csvProblems.map((p) => (
              <li key={p}>{p}</li>
            ))}
          </ul>
        )}
      </details>
    </div>
  );
}

function JsonEditor({ d, onChange, issues }: { d: JsonDraft; onChange: (d: Draft) => void; issues: Issues }) {
  const all = [...issues.values()].flat();
  return (
    <div className="mt-3">
      <label htmlFor="params-json" className="text-sm font-semibold">
        Parameters (JSON)
      </label>
      <p id="params-json-help" className="mt-1 text-xs text-ink-soft">
        This model is too large for the grid editors (or lists its transitions sparsely), so it is edited as JSON in the parameter format.
      </p>
      <textarea
        id="params-json"
        className="field mt-1 h-80 font-mono text-xs"
        value={d.json}
        spellCheck={false}
        onChange={(e) => onChange({ ...d, json: e.target.value })}
        aria-invalid={all.length ? true : undefined}
        aria-describedby={`params-json-help${all.length ? " params-json-error" : ""}`}
      />
      <FieldError id="params-json-error" messages={all} />
    </div>
  );
}

/** The family's editor for a draft. */
export function ModelEditor({ draft, onChange, issues }: { draft: Draft; onChange: (d: Draft) => void; issues: Issues }) {
  if ("asJson" in draft) return <JsonEditor d={draft} onChange={onChange} issues={issues} />;
  switch (draft.family) {
    case "markov":
      return <MarkovEditor d={draft} onChange={onChange} issues={issues} />;
    case "hidden":
      return <HiddenEditor d={draft} onChange={onChange} issues={issues} />;
    case "two-state":
      return <TwoStateEditor d={draft} onChange={onChange} issues={issues} />;
    case "iid":
      return <IidEditor d={draft} onChange={onChange} issues={issues} />;
    case "graph-walk":
      return <GraphEditor d={draft} onChange={onChange} issues={issues} />;
  }
}
