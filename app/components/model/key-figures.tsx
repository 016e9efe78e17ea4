/** The compact key-figures strip that leads the page, in the chosen unit. */
import type { ComputeResult } from "~/engine/compute";
import { formatRate, fromBits, unitLabel, useUnits } from "~/units";
import { formatDate, formatFixed } from "./format";

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

export function KeyFigures({ figures, edition, total, publishedAt }: { figures: ComputeResult; edition: number; total: number; publishedAt: Date }) {
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
              <span className="font-mono figures text-xl font-semibold" data-testid="entropy-rate">
                {formatRate(figures.entropyRate, unit)}
              </span>{" "}
              <span className="text-sm" data-testid="entropy-rate-unit">
                {u}
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
            <>
              <span className="font-mono figures text-lg font-semibold" data-testid="min-entropy-rate">
                {formatRate(figures.minEntropyRate, unit)}
              </span>{" "}
              <span className="text-sm">{u}</span>
            </>
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
        </Cell>
      </dl>
      {figures.minEntropyRate && <MinEntropyCaution />}
    </section>
  );
}
