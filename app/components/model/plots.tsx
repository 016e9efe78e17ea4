/**
 * Convergence and Rényi plots (recharts 3). recharts draws nothing useful on the server, so the chart
 * box has a fixed height from the first byte (nothing jumps) and the chart mounts in the browser;
 * each plot has a caption and its numbers in a table inside <details>.
 */
import { useEffect, useState } from "react";
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, Tooltip, XAxis, YAxis } from "recharts";
import type { ComputeResult } from "~/engine/compute";
import type { VerificationRecord } from "~/engine/verification";
import { fromBits, unitLabel, useUnits } from "~/units";
import { niceAxis } from "./axis";
import { formatFixed } from "./format";
import { PLOT } from "./heat";
import { VerificationStatus, checksFor } from "./verification-view";

const CHART_HEIGHT = 260;

function useMounted(): boolean {
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  return mounted;
}

function ChartBox({ children, label }: { children: React.ReactNode; label: string }) {
  return (
    <div className="mp-chart" style={{ height: CHART_HEIGHT }} role="img" aria-label={label}>
      {children}
    </div>
  );
}

const tick = { fontSize: 11, fill: "#5a5247", fontFamily: "Noto Sans Mono, monospace" };

function round(x: number | null): number | null {
  return x === null ? null : Number(x.toPrecision(10));
}

export function ConvergencePlot({ figures, verification }: { figures: ComputeResult; verification: VerificationRecord }) {
  const { unit } = useUnits();
  const mounted = useMounted();
  const u = unitLabel(unit);
  const hidden = figures.family === "hidden";
  const lower = new Map((figures.bounds ?? []).map((b) => [b.n, b.lower]));
  const rows = figures.blockEntropies.map((b) => ({
    n: b.n,
    perSymbol: round(fromBits(b.perSymbol, unit)),
    conditional: round(fromBits(b.conditional, unit)),
    lower: hidden ? round(fromBits(lower.get(b.n) ?? null, unit)) : null,
  }));
  if (rows.length === 0) return <p className="text-sm text-ink-soft">No block entropies are stored for this edition.</p>;
  const rate = fromBits(figures.entropyRate?.bits, unit);
  const last = figures.bounds?.[figures.bounds.length - 1];
  const axis = niceAxis([...rows.flatMap((r) => [r.perSymbol, r.conditional, r.lower]), rate, fromBits(last?.lower, unit), fromBits(last?.upper, unit)]);
  const caption = hidden
    ? `H(Yⁿ)/n and the bounds H(Yₙ | Yⁿ⁻¹, X₁) ≤ H ≤ H(Yₙ | Yⁿ⁻¹) against n = 1 … ${rows.length}, in ${u}; dashed lines: the last lower and upper bounds.`
    : `H(Xⁿ)/n and H(Xₙ | Xⁿ⁻¹) against n = 1 … ${rows.length}, in ${u}, converging to the entropy rate (dashed line). H(Xⁿ)/n approaches from above, more slowly.`;
  return (
    <figure>
      <ChartBox label={caption}>
        {mounted && (
          <LineChart responsive style={{ width: "100%", height: CHART_HEIGHT }} data={rows} margin={{ top: 8, right: 40, bottom: 24, left: 8 }}>
            <CartesianGrid stroke="#e4dccb" strokeDasharray="2 4" />
            <XAxis dataKey="n" type="number" domain={[1, rows.length]} allowDecimals={false} tick={tick} label={{ value: "block length n", position: "insideBottom", offset: -14, fontSize: 12, fill: "#26221d" }} />
            <YAxis tick={tick} width={72} domain={axis.domain} ticks={axis.ticks} interval={0} tickFormatter={(v: number) => v.toFixed(axis.decimals)} label={{ value: u, angle: -90, position: "insideLeft", fontSize: 12, fill: "#26221d" }} />
            <Tooltip formatter={(v) => (typeof v === "number" ? v.toFixed(8) : String(v))} labelFormatter={(n) => `n = ${n}`} />
            <Legend verticalAlign="top" height={24} wrapperStyle={{ fontSize: 12 }} />
            {!hidden && rate !== null && <ReferenceLine y={rate} stroke={PLOT.reference} strokeDasharray="6 4" label={{ value: "rate", position: "right", fontSize: 11, fill: "#26221d" }} />}
            {hidden && last && (
              <>
                <ReferenceLine y={fromBits(last.lower, unit) ?? 0} stroke={PLOT.lower} strokeDasharray="6 4" />
                <ReferenceLine y={fromBits(last.upper, unit) ?? 0} stroke={PLOT.conditional} strokeDasharray="6 4" />
              </>
            )}
            <Line type="monotone" dataKey="perSymbol" name={hidden ? "H(Yⁿ)/n" : "H(Xⁿ)/n"} stroke={PLOT.perSymbol} strokeWidth={2} dot={{ r: 3 }} isAnimationActive={false} />
            <Line type="monotone" dataKey="conditional" name={hidden ? "upper H(Yₙ | Yⁿ⁻¹)" : "H(Xₙ | Xⁿ⁻¹)"} stroke={PLOT.conditional} strokeWidth={2} strokeDasharray="8 3" dot={{ r: 3, strokeDasharray: "" }} isAnimationActive={false} />
            {hidden && <Line type="monotone" dataKey="lower" name="lower H(Yₙ | Yⁿ⁻¹, X₁)" stroke={PLOT.lower} strokeWidth={2} strokeDasharray="2 3" dot={{ r: 3, strokeDasharray: "" }} isAnimationActive={false} />}
          </LineChart>
        )}
      </ChartBox>
      <figcaption className="mt-1 text-sm text-ink-soft">{caption}</figcaption>
      <details className="mp-details mt-1 text-xs">
        <summary>The plotted numbers</summary>
        <div className="mt-2 overflow-x-auto">
          <table className="mp-table font-mono figures">
            <caption className="sr-only">Block entropies in {u}</caption>
            <thead>
              <tr>
                <th scope="col">n</th>
                <th scope="col">{hidden ? "H(Yⁿ)/n" : "H(Xⁿ)/n"}</th>
                <th scope="col">{hidden ? "upper" : "H(Xₙ | Xⁿ⁻¹)"}</th>
                {hidden && <th scope="col">lower</th>}
              </tr>
            </thead>
            <tbody>
              {rows.map((r) => (
                <tr key={r.n}>
                  <th scope="row">{r.n}</th>
                  <td>{formatFixed(r.perSymbol, 9)}</td>
                  <td>{formatFixed(r.conditional, 9)}</td>
                  {hidden && <td>{formatFixed(r.lower, 9)}</td>}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </details>
      {!hidden && <VerificationStatus checks={checksFor(verification, "blockEntropies")} label="The last conditional entropy" />}
    </figure>
  );
}

export function RenyiPlot({ figures }: { figures: ComputeResult }) {
  const { unit } = useUnits();
  const mounted = useMounted();
  const u = unitLabel(unit);
  if (!figures.renyi.length || !figures.entropyRate) {
    return <p className="text-sm text-ink-soft">No Rényi rates are stored for this edition{figures.family === "hidden" ? " (they are not computed for hidden sources)" : ""}.</p>;
  }
  const points = [...figures.renyi.map((r) => ({ order: r.order, rate: unit === "bits" ? r.bits : r.nats })), { order: 1, rate: fromBits(figures.entropyRate.bits, unit)! }]
    .sort((a, b) => a.order - b.order)
    .map((p) => ({ order: p.order, rate: round(p.rate) }));
  const min = fromBits(figures.minEntropyRate?.bits, unit);
  const maxOrder = points[points.length - 1].order;
  const axis = niceAxis([...points.map((p) => p.rate), min], { floor: 0 });
  const caption = `The Rényi entropy rate against the order α (stored orders, and the Shannon rate at α = 1), in ${u}; it falls with α towards the min-entropy rate${min !== null ? " (dashed asymptote)" : ""}.`;
  return (
    <figure>
      <ChartBox label={caption}>
        {mounted && (
          <LineChart responsive style={{ width: "100%", height: CHART_HEIGHT }} data={points} margin={{ top: 8, right: 40, bottom: 24, left: 8 }}>
            <CartesianGrid stroke="#e4dccb" strokeDasharray="2 4" />
            <XAxis dataKey="order" type="number" domain={[0, Math.ceil(maxOrder)]} tick={tick} label={{ value: "order α", position: "insideBottom", offset: -14, fontSize: 12, fill: "#26221d" }} />
            <YAxis tick={tick} width={72} domain={axis.domain} ticks={axis.ticks} interval={0} tickFormatter={(v: number) => v.toFixed(axis.decimals)} label={{ value: u, angle: -90, position: "insideLeft", fontSize: 12, fill: "#26221d" }} />
            <Tooltip formatter={(v) => (typeof v === "number" ? v.toFixed(8) : String(v))} labelFormatter={(a) => `α = ${a}`} />
            <Legend verticalAlign="top" height={24} wrapperStyle={{ fontSize: 12 }} />
            {min !== null && <ReferenceLine y={min} stroke={PLOT.minEntropy} strokeDasharray="6 4" label={{ value: "min-entropy", position: "insideBottomRight", fontSize: 11, fill: "#26221d" }} />}
            <ReferenceLine x={1} stroke="#bfb39c" strokeDasharray="2 3" />
            <Line type="monotone" dataKey="rate" name="Rényi rate" stroke={PLOT.renyi} strokeWidth={2} dot={{ r: 4 }} isAnimationActive={false} />
          </LineChart>
        )}
      </ChartBox>
      <figcaption className="mt-1 text-sm text-ink-soft">{caption}</figcaption>
      <details className="mp-details mt-1 text-xs">
        <summary>The plotted numbers</summary>
        <table className="mp-table mt-2 font-mono figures">
          <caption className="sr-only">Rényi rates in {u}</caption>
          <thead>
            <tr>
              <th scope="col">α</th>
              <th scope="col">rate</th>
            </tr>
          </thead>
          <tbody>
            {points.map((p) => (
              <tr key={p.order}>
                <th scope="row">{p.order === 1 ? "1 (Shannon)" : p.order}</th>
                <td>{formatFixed(p.rate, 9)}</td>
              </tr>
            ))}
            {min !== null && (
              <tr>
                <th scope="row">∞ (min-entropy)</th>
                <td>{formatFixed(min, 9)}</td>
              </tr>
            )}
          </tbody>
        </table>
      </details>
    </figure>
  );
}
