/** The compact key-figures strip that leads the page, in the chosen unit. */
import type { ComputeResult } from "~/engine/compute";
import { fromBits, unitLabel, useUnits, type Unit } from "~/units";
import { formatDate, formatFixed, formatHeadline } from "./format";

/** A rate of the strip in the chosen unit: six decimals, or four significant digits when it is below 0.001. */
function stripRate(rate: { bits: number; nats: number }, unit: Unit): string {
  return formatHeadline(unit === "bits" ? rate.bits : rate.nats, 6);
}

function classification(f: ComputeResult): string {
  const closed = f.classes.filter((c) => c.closed).length;
  const parts = [f.irreducible ? "irreducible" : `reducible, ${closed} closed class${closed === 1 ? "" : "es"}`];
  if (f.period === null) parts.push("period per class");
  else parts.push(f.period === 1 ? "aperiodic" : `period ${f.period}`);
  return parts.join(", ");
}

function Cell({ label, children, wide = false }: { label: string; children: React.ReactNode; wide?: boolean }) {
  return (
    <div className={`mp-kf-cell ${wide ? "mp-kf-wide" : ""}`}>
      <dt className="eyebrow">{label}</dt>
      <dd className="mt-1">{children}</dd>
    </div>
  );
}

export function MinEntropyCaution() {
  return (
    <p className="mp-caution mt-2 text-xs text-ink-soft" role="note">
      <strong className="text-ink">Min-entropy is a model estimate.</strong> It does not replace validation of a physical entropy source under the
      applicable standard and by an accredited laboratory, and health tests of the real source are still required.
    </p>
  );
}

export function KeyFigures({
  figures,
  edition,
  total,
  publishedAt,
  retracted = false,
}: {
  figures: ComputeResult;
  edition: number;
  total: number;
  publishedAt: Date;
  retracted?: boolean;
}) {
  const { unit } = useUnits();
  const u = unitLabel(unit);
  const hidden = figures.family === "hidden";
  const last = figures.bounds?.[figures.bounds.length - 1];
  const stateWord = figures.family === "graph-walk" ? "nodes" : figures.family === "hidden" ? "hidden states" : figures.states.length !== figures.symbols.length ? "contexts" : "states";
  return (
    <section aria-label="Key figures" className="mp-keyfigures">
      <dl className="mp-kf card" data-testid="key-figures">
        <Cell label={hidden ? "Entropy rate (bounds)" : "Entropy rate"} wide>
          {figures.entropyRate ? (
            <>
              <span className="mp-kf-figure">
                <span className="font-mono figures text-2xl font-bold sm:text-3xl" data-testid="entropy-rate">
                  {stripRate(figures.entropyRate, unit)}
                </span>{" "}
                <span className="text-sm" data-testid="entropy-rate-unit">
                  {u}
                </span>
              </span>
              {hidden && last && (
                <span className="mt-0.5 block font-mono figures text-xs text-ink-soft">
                  midpoint of [{formatFixed(fromBits(last.lower, unit), 7)}, {formatFixed(fromBits(last.upper, unit), 7)}] at n = {last.n}
                </span>
              )}
            </>
          ) : (
            <span className="text-sm">No single rate: {figures.message ?? "it depends on the starting state"}</span>
          )}
        </Cell>
        <Cell label="Min-entropy rate">
          {figures.minEntropyRate ? (
            <span className="mp-kf-figure">
              <span className="font-mono figures text-lg font-semibold" data-testid="min-entropy-rate">
                {stripRate(figures.minEntropyRate, unit)}
              </span>{" "}
              <span className="text-sm">{u}</span>
            </span>
          ) : (
            <span className="text-sm text-ink-soft">{hidden ? "not computed for hidden sources" : "—"}</span>
          )}
        </Cell>
        <Cell label={`Number of ${stateWord}`}>
          <span className="font-mono figures text-lg font-semibold">{figures.states.length}</span>
          {stateWord === "contexts" && <span className="block text-xs text-ink-soft">{figures.symbols.length} symbols</span>}
          {hidden && <span className="block text-xs text-ink-soft">{figures.symbols.length} emitted symbols</span>}
        </Cell>
        <Cell label="Class structure">
          <span className="text-sm font-semibold">{classification(figures)}</span>
        </Cell>
        <Cell label="Edition">
          <span className="font-mono figures text-lg font-semibold">{edition}</span>
          <span className="text-sm"> of {total}</span>
          <span className="block font-mono figures text-xs text-ink-soft">{formatDate(publishedAt)}</span>
          {retracted && (
            <span className="mp-kf-retracted">
              <span aria-hidden="true">⚠ </span>retracted
            </span>
          )}
        </Cell>
      </dl>
      {figures.minEntropyRate && <MinEntropyCaution />}
    </section>
  );
}
