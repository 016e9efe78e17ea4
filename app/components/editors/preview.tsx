/**
 * The live preview beside an editor. Small chains are computed in the browser on each change (a
 * light debounce, without the verification pass: computeUnverified); hidden sources and chains of
 * more than PREVIEW_LOCAL_LIMIT states go to POST /api/v1/compute, with a visible pending state.
 * A sweep chart shows the entropy rate against one chosen parameter.
 */
import { useEffect, useMemo, useState } from "react";
import { CartesianGrid, Line, LineChart, ReferenceLine, Tooltip, XAxis, YAxis } from "recharts";
import { parseComputeRequest, sweepEntropyRate, type InputIssue, type SweepParameter, type SweepPoint } from "~/engine";
import { computeUnverified, type UnverifiedResult } from "~/engine/compute";
import { MinEntropyCaution } from "~/components/model/key-figures";
import { PLOT } from "~/components/model/heat";
import { formatRate, fromBits, unitLabel, useUnits } from "~/units";

/** Chains up to this many states are previewed in the browser. */
export const PREVIEW_LOCAL_LIMIT = 64;
const DEBOUNCE_MS = 120;
const SWEEP_STEPS = 41;
const CHART_HEIGHT = 220;

export type PreviewState =
  | { kind: "idle" }
  | { kind: "pending" }
  | { kind: "ready"; result: Pick<UnverifiedResult, "entropyRate" | "minEntropyRate" | "stationary" | "states" | "irreducible" | "period" | "message" | "notes" | "family" | "bounds">; where: "browser" | "server"; ms?: number }
  | { kind: "invalid"; message: string; issues: InputIssue[] }
  | { kind: "failed"; message: string };

type ReadyState = Extract<PreviewState, { kind: "ready" }>;

/** The current preview and the last one that had figures (shown dimmed while the parameters are invalid). */
export interface Preview {
  state: PreviewState;
  last: ReadyState | null;
}

/** Computes the preview of `model` (JSON) locally or on the server, debounced; re-runs when `key` changes. */
export function usePreview(model: unknown, local: boolean): Preview {
  const [state, setStateRaw] = useState<PreviewState>({ kind: "idle" });
  const [last, setLast] = useState<ReadyState | null>(null);
  const setState = (s: PreviewState) => {
    setStateRaw(s);
    if (s.kind === "ready") setLast(s);
  };
  const key = useMemo(() => JSON.stringify(model), [model]);
  useEffect(() => {
    let cancelled = false;
    const controller = new AbortController();
    const timer = setTimeout(async () => {
      if (local) {
        const t0 = performance.now();
        const parsed = parseComputeRequest({ model, blockLengths: 1 });
        if (!parsed.ok) return setState({ kind: "invalid", message: parsed.error.message, issues: parsed.error.issues });
        try {
          const result = computeUnverified(parsed.value);
          if (!cancelled) setState({ kind: "ready", result: { ...result, notes: [...parsed.notes, ...result.notes] }, where: "browser", ms: performance.now() - t0 });
        } catch (e) {
          if (!cancelled) setState({ kind: "failed", message: e instanceof Error ? e.message : String(e) });
        }
        return;
      }
      setState({ kind: "pending" });
      try {
        const res = await fetch("/api/v1/compute", {
          method: "POST",
          headers: { "Content-Type": "application/json" },
          body: JSON.stringify({ model, blockLengths: 8 }),
          signal: controller.signal,
        });
        const body = (await res.json()) as { error?: { message: string; issues: InputIssue[] } } & PreviewStateReadyResult;
        if (cancelled) return;
        if (res.ok) setState({ kind: "ready", result: body, where: "server" });
        else if (body.error) setState({ kind: "invalid", message: body.error.message, issues: body.error.issues ?? [] });
        else setState({ kind: "failed", message: `the server answered ${res.status}` });
      } catch (e) {
        if (!cancelled && !(e instanceof DOMException && e.name === "AbortError")) setState({ kind: "failed", message: "the server could not be reached; the preview will retry on your next change" });
      }
    }, local ? DEBOUNCE_MS : 400);
    return () => {
      cancelled = true;
      clearTimeout(timer);
      controller.abort();
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, local]);
  return { state, last };
}
type PreviewStateReadyResult = Extract<PreviewState, { kind: "ready" }>["result"];

function Figure({ label, children, testId }: { label: string; children: React.ReactNode; testId?: string }) {
  return (
    <div className="min-w-0">
      <dt className="eyebrow">{label}</dt>
      <dd className="figures mt-0.5 font-mono text-lg font-semibold" data-testid={testId}>
        {children}
      </dd>
    </div>
  );
}

/** An issue as "path: message", without repeating a path the message already starts with. */
function IssueText({ issue }: { issue: InputIssue }) {
  const path = issue.path.replace(/^model\.?/, "") || "model";
  if (issue.message.startsWith(path)) return <>{issue.message}</>;
  return (
    <>
      <code className="text-xs">{path}</code>: {issue.message}
    </>
  );
}

export function PreviewPanel({ preview, stale, remote }: { preview: Preview; stale: boolean; remote: boolean }) {
  const { unit } = useUnits();
  const u = unitLabel(unit);
  const { state } = preview;
  // While the parameters are invalid (or being recomputed) the last figures stay, dimmed and labelled.
  const shown = state.kind === "ready" ? state : state.kind === "invalid" || state.kind === "pending" || state.kind === "failed" ? preview.last : null;
  const r = shown?.result ?? null;
  const old = state.kind !== "ready" && r !== null;
  return (
    <section aria-labelledby="preview-title" className="card p-4" aria-busy={state.kind === "pending"}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="preview-title" className="font-semibold">
          Live preview
        </h2>
        <p className="text-xs text-ink-soft" role="status">
          {state.kind === "pending" && <span className="font-semibold text-ink">Computing on the server…</span>}
          {state.kind === "ready" && (state.where === "browser" ? `computed in this browser${state.ms !== undefined ? ` in ${state.ms.toFixed(0)} ms` : ""}` : "computed on the server")}
          {stale && state.kind === "ready" ? " · unsaved changes" : ""}
        </p>
      </div>
      {state.kind === "pending" && <div className="ws-pending-bar mt-2" aria-hidden="true" data-testid="preview-pending" />}
      <p className="mt-1 text-xs text-ink-soft">
        {remote
          ? "Hidden sources and chains of more than 64 states are computed by the server's compute API as you edit."
          : "Computed in your browser as you type, without the verification pass; the server validates and verifies when you save."}
      </p>
      {state.kind === "invalid" && (
        <div className="mt-3 rounded border border-bad/40 bg-bad/5 p-3 text-sm text-bad" role="alert">
          <p className="font-semibold">
            <span aria-hidden="true">✕ </span>No figures: the parameters are not valid yet.
          </p>
          <ul className="mt-1 list-disc pl-5">
            {state.issues.slice(0, 8).map((i, k) => (
              <li key={k}>
                <IssueText issue={i} />
              </li>
            ))}
            {state.issues.length > 8 && <li>and {state.issues.length - 8} more, marked in the editor</li>}
            {state.issues.length === 0 && <li>{state.message}</li>}
          </ul>
        </div>
      )}
      {state.kind === "failed" && (
        <p className="mt-3 rounded border border-warn/40 bg-warn/5 p-3 text-sm text-warn" role="alert">
          <span aria-hidden="true">⚠ </span>
          {state.message}
        </p>
      )}
      {old && state.kind !== "pending" && (
        <p className="mt-3 text-xs font-semibold text-ink-soft" data-testid="preview-last-valid">
          Last valid figures, before your latest change:
        </p>
      )}
      <dl className={`mt-3 grid grid-cols-2 gap-3 ${old ? "opacity-55" : ""}`}>
        <Figure label={`Entropy rate (${u})`} testId="preview-entropy-rate">
          {r ? formatRate(r.entropyRate, unit) : "—"}
        </Figure>
        <Figure label={`Min-entropy rate (${u})`} testId="preview-min-entropy-rate">
          {r ? (r.family === "hidden" ? <span className="font-sans text-sm font-normal text-ink-soft">not computed for hidden sources</span> : formatRate(r.minEntropyRate, unit)) : "—"}
        </Figure>
        {r?.family === "iid" ? (
          <Figure label="Symbols">{r.states.length}</Figure>
        ) : (
          <>
            <Figure label="Irreducible">{r ? (r.irreducible ? "yes" : "no") : "—"}</Figure>
            <Figure label="Period">{r ? (r.period === null ? "—" : r.period === 1 ? "1 (aperiodic)" : String(r.period)) : "—"}</Figure>
          </>
        )}
      </dl>
      {r?.message && (
        <p className="mt-2 rounded border border-warn/40 bg-warn/5 p-2 text-sm" role="note">
          <span aria-hidden="true">⚠ </span>
          {r.message}
        </p>
      )}
      {r && r.family !== "hidden" && <MinEntropyCaution />}
      {r?.bounds && r.bounds.length > 0 && (
        <p className="figures mt-2 font-mono text-xs text-ink-soft">
          bounds at n = {r.bounds[r.bounds.length - 1].n}: {fromBits(r.bounds[r.bounds.length - 1].lower, unit)?.toFixed(6)} ≤ H ≤ {fromBits(r.bounds[r.bounds.length - 1].upper, unit)?.toFixed(6)} {u}
        </p>
      )}
      {r?.stationary && (
        <details className="mt-3" open={r.stationary.length <= 12}>
          <summary className="cursor-pointer text-sm font-semibold">
            {r.family === "iid" ? `Symbol probabilities (${r.stationary.length} symbols)` : `Stationary distribution μ (${r.stationary.length} states)`}
          </summary>
          <div className="mt-1 max-h-64 overflow-y-auto">
            <table className="w-full text-sm">
              <tbody>
                {r.stationary.map((p, i) => (
                  <tr key={i} className="border-b border-rule/60">
                    <th scope="row" className="py-0.5 pr-2 text-left font-mono text-xs font-normal">
                      {r.states[i]}
                    </th>
                    <td className="figures py-0.5 text-right font-mono text-xs">{p.toFixed(6)}</td>
                    <td className="w-1/3 py-0.5 pl-2" aria-hidden="true">
                      <div className="h-2 rounded-sm" style={{ width: `${Math.max(0, Math.min(1, p)) * 100}%`, background: PLOT.perSymbol }} />
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </details>
      )}
      {r && r.notes.length > 0 && (
        <details className="mt-2 text-xs text-ink-soft">
          <summary className="cursor-pointer">Engine notes ({r.notes.length})</summary>
          <ul className="mt-1 list-disc pl-5">
            {r.notes.map((n, i) => (
              <li key={i}>{n}</li>
            ))}
          </ul>
        </details>
      )}
    </section>
  );
}

/** What a sweep varies: a parameter the engine's sweep knows, or one edge weight of a graph walk. */
export type SweepTarget = { kind: "engine"; parameter: SweepParameter } | { kind: "edge"; index: number };

export interface SweepChoice {
  id: string;
  label: string;
  target: SweepTarget;
  /** The range swept: probabilities over [0, 1]; an edge weight from 0 to twice its current value. */
  from: number;
  to: number;
  /** How the rest of the model follows the varied value (for the caption). */
  rule: string;
}

const ROW_RULE = "the rest of its row rescaled to keep the sum 1";

/** The parameters a sweep can vary for this model, with a label each. */
export function sweepChoices(model: unknown): SweepChoice[] {
  const m = model as { family?: string; alphabet?: string[]; order?: number; P?: unknown[][]; p?: unknown[]; edges?: unknown[][] };
  const engine = (id: string, label: string, parameter: SweepParameter, rule: string): SweepChoice => ({ id, label, target: { kind: "engine", parameter }, from: 0, to: 1, rule });
  if (m.family === "two-state" && m.alphabet) {
    return [
      engine("a", `a = P(${m.alphabet[0]} → ${m.alphabet[1]})`, { kind: "two-state", name: "a" }, "b held fixed"),
      engine("b", `b = P(${m.alphabet[1]} → ${m.alphabet[0]})`, { kind: "two-state", name: "b" }, "a held fixed"),
    ];
  }
  if (m.family === "iid" && m.alphabet) {
    return m.alphabet.map((s, i) => engine(`p${i}`, `p(${s})`, { kind: "iid", index: i }, "the other probabilities rescaled to keep the sum 1"));
  }
  if (m.family === "markov" && m.alphabet && Array.isArray(m.P) && m.P.length <= 256) {
    const order = m.order ?? 1;
    const k = m.alphabet.length;
    const out: SweepChoice[] = [];
    for (let r = 0; r < m.P.length; r++) {
      let rest = r;
      const parts: string[] = [];
      for (let t = 0; t < order; t++) {
        parts.unshift(m.alphabet[rest % k]);
        rest = Math.floor(rest / k);
      }
      const ctx = parts.join("·");
      for (let c = 0; c < k; c++) out.push(engine(`${r}-${c}`, `P(${ctx} → ${m.alphabet[c]})`, { kind: "entry", row: r, col: c }, ROW_RULE));
    }
    return out;
  }
  if (m.family === "graph-walk" && Array.isArray(m.edges) && m.edges.length <= 2000) {
    return m.edges.flatMap((e, index) => {
      const w = e[2];
      if (typeof w !== "number" || !(w >= 0)) return [];
      return [{ id: `e${index}`, label: `w(${String(e[0])} – ${String(e[1])})`, target: { kind: "edge", index } as const, from: 0, to: w > 0 ? 2 * w : 1, rule: "the other weights held fixed" }];
    });
  }
  return [];
}

/** Entropy rate of a graph walk with one edge weight set to each x; null (with a reason) where there is no single rate. */
function sweepEdge(model: unknown, index: number, from: number, to: number, steps: number): SweepPoint[] {
  const m = model as { edges: [unknown, unknown, number][] };
  const points: SweepPoint[] = [];
  for (let i = 0; i < steps; i++) {
    const x = i === steps - 1 ? to : from + ((to - from) * i) / (steps - 1);
    const edges = m.edges.map((e, j) => (j === index ? [e[0], e[1], x] : e));
    const parsed = parseComputeRequest({ model: { ...m, edges }, blockLengths: 1, renyiOrders: [] });
    if (!parsed.ok) {
      points.push({ x, bits: null, reason: parsed.error.message });
      continue;
    }
    try {
      const r = computeUnverified(parsed.value);
      points.push(r.entropyRate ? { x, bits: r.entropyRate.bits } : { x, bits: null, reason: r.message ?? "no single entropy rate" });
    } catch (e) {
      points.push({ x, bits: null, reason: e instanceof Error ? e.message : String(e) });
    }
  }
  return points;
}

export function SweepChart({ model, valid, family, local }: { model: unknown; valid: boolean; family: string; local: boolean }) {
  const { unit } = useUnits();
  const choices = useMemo(() => sweepChoices(model), [model]);
  const [choiceId, setChoiceId] = useState<string>("");
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  const choice =
    choices.find((c) => c.id === choiceId) ??
    choices.find((c) => c.target.kind !== "engine" || c.target.parameter.kind !== "entry" || c.target.parameter.row !== c.target.parameter.col) ??
    choices[0];
  const key = JSON.stringify(model);
  const [points, setPoints] = useState<SweepPoint[] | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  useEffect(() => {
    if (!choice || !valid) {
      setPoints(null);
      return;
    }
    const t = setTimeout(() => {
      try {
        setPoints(
          choice.target.kind === "edge"
            ? sweepEdge(model, choice.target.index, choice.from, choice.to, SWEEP_STEPS)
            : sweepEntropyRate(model, { parameter: choice.target.parameter, from: choice.from, to: choice.to, steps: SWEEP_STEPS }).points,
        );
        setProblem(null);
      } catch (e) {
        setPoints(null);
        setProblem(e instanceof Error ? e.message : String(e));
      }
    }, 200);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, choice?.id, valid]);
  const current = currentValue(model, choice);
  const u = unitLabel(unit);
  const rows = (points ?? []).map((p) => ({ x: p.x, y: p.bits === null ? null : fromBits(p.bits, unit) }));
  const gaps = (points ?? []).filter((p) => p.bits === null);
  const caption = choice ? `Entropy rate (${u}) as ${choice.label} runs from ${choice.from} to ${Number(choice.to.toPrecision(6))}, ${choice.rule}; dashed line: the current value.` : "";
  return (
    <section aria-labelledby="sweep-title" className="card p-4">
      <h2 id="sweep-title" className="font-semibold">
        Sensitivity sweep
      </h2>
      {choices.length === 0 || !local ? (
        <p className="mt-2 text-sm text-ink-soft">
          {!local && family !== "hidden"
            ? "Sweeps run in your browser, for models of up to 64 states; this one is larger."
            : family === "hidden"
            ? "Not offered for hidden sources: every point would need the sandwich bounds computed afresh. Change one entry and watch the preview instead."
            : "A sweep varies one probability or edge weight; this model lists too many entries to offer one."}
        </p>
      ) : (
        <>
          <label htmlFor="sweep-parameter" className="mt-2 block text-sm font-semibold">
            Vary
          </label>
          <select id="sweep-parameter" className="field mt-1 py-1 font-mono text-sm" value={choice?.id ?? ""} onChange={(e) => setChoiceId(e.target.value)}>
            {choices.map((c) => (
              <option key={c.id} value={c.id}>
                {c.label}
              </option>
            ))}
          </select>
          <figure className="mt-2">
            <div style={{ height: CHART_HEIGHT }} role="img" aria-label={caption} data-testid="sweep-chart">
              {mounted && points && (
                <LineChart responsive style={{ width: "100%", height: CHART_HEIGHT }} data={rows} margin={{ top: 8, right: 12, bottom: 20, left: 4 }}>
                  <CartesianGrid stroke="#e4dccb" strokeDasharray="2 4" />
                  <XAxis dataKey="x" type="number" domain={[choice!.from, choice!.to]} tick={{ fontSize: 11, fill: "#5a5247" }} tickFormatter={(v: number) => String(Number(v.toPrecision(3)))} label={{ value: choice?.label ?? "", position: "insideBottom", offset: -12, fontSize: 11, fill: "#26221d" }} />
                  <YAxis tick={{ fontSize: 11, fill: "#5a5247" }} width={56} tickFormatter={(v: number) => v.toFixed(3)} />
                  <Tooltip formatter={(v) => (typeof v === "number" ? `${v.toFixed(6)} ${u}` : "no single rate")} labelFormatter={(x) => `${choice?.label} = ${Number(x).toPrecision(4)}`} />
                  {current !== null && <ReferenceLine x={current} stroke={PLOT.reference} strokeDasharray="6 4" />}
                  <Line type="monotone" dataKey="y" stroke={PLOT.perSymbol} strokeWidth={2} dot={false} connectNulls={false} isAnimationActive={false} />
                </LineChart>
              )}
              {!valid && <p className="pt-16 text-center text-sm text-ink-soft">The sweep appears when the parameters are valid.</p>}
              {problem && <p className="pt-16 text-center text-sm text-warn">{problem}</p>}
            </div>
            <figcaption className="text-xs text-ink-soft">
              {caption}
              {valid && gaps.length > 0 && (
                <span className="mt-1 block">
                  Gaps: no single entropy rate at {gaps.length} of {SWEEP_STEPS} points ({gaps[0].reason}).
                </span>
              )}
            </figcaption>
          </figure>
        </>
      )}
    </section>
  );
}

function currentValue(model: unknown, choice: SweepChoice | undefined): number | null {
  if (!choice) return null;
  const m = model as { a?: unknown; b?: unknown; p?: unknown[]; P?: unknown[][]; edges?: unknown[][] };
  const t = choice.target;
  const v =
    t.kind === "edge"
      ? m.edges?.[t.index]?.[2]
      : t.parameter.kind === "two-state"
        ? m[t.parameter.name]
        : t.parameter.kind === "iid"
          ? m.p?.[t.parameter.index]
          : m.P?.[t.parameter.row]?.[t.parameter.col];
  return typeof v === "number" && v >= choice.from && v <= choice.to ? v : null;
}

/**
 * On narrow screens the preview panel sits below the editor, out of sight while typing: this strip
 * keeps the two headline figures pinned to the bottom of the window (hidden where the panel is beside the editor).
 */
export function PreviewStrip({ preview }: { preview: Preview }) {
  const { unit } = useUnits();
  const { state } = preview;
  const shown = state.kind === "ready" ? state : preview.last;
  const r = shown?.result ?? null;
  const note = state.kind === "pending" ? "computing…" : state.kind === "invalid" ? "not valid yet" : state.kind === "failed" ? "not computed" : null;
  return (
    <div className="ws-strip" aria-hidden="true">
      <span>
        H <strong className="figures font-mono">{r ? formatRate(r.entropyRate, unit, 4) : "—"}</strong>
      </span>
      <span>
        H<sub>∞</sub>{" "}
        <strong className="figures font-mono">{r ? (r.family === "hidden" ? "n/a" : formatRate(r.minEntropyRate, unit, 4)) : "—"}</strong>
      </span>
      <span className="text-ink-soft">{unitLabel(unit)}</span>
      {note && <span className="font-semibold text-warn">{note}</span>}
    </div>
  );
}
