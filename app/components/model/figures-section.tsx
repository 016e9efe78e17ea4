/** Every stored figure of the edition, each with its verification status and the checks behind it. */
import type { ComputeResult } from "~/engine/compute";
import type { VerificationRecord } from "~/engine/verification";
import { formatRate, fromBits, unitLabel, useUnits } from "~/units";
import { formatFixed, formatSmall, formatSpread, tidyNumbersInText } from "./format";
import { heatColour } from "./heat";
import { MinEntropyCaution } from "./key-figures";
import { PRINT_ROWS } from "./parameters";
import { VerificationStatus, checksFor } from "./verification-view";

function Figure({ title, children, id }: { title: string; children: React.ReactNode; id?: string }) {
  return (
    <article className="mp-figure card p-4" aria-labelledby={id}>
      <h3 id={id} className="text-base font-bold">
        {title}
      </h3>
      <div className="mt-2">{children}</div>
    </article>
  );
}

export function FiguresSection({ figures, verification }: { figures: ComputeResult; verification: VerificationRecord }) {
  const { unit } = useUnits();
  const u = unitLabel(unit);
  const hidden = figures.family === "hidden";
  const mu = figures.stationary;
  // Probabilities share the matrices' absolute 0–1 shading scale.
  const maxMu = 1;
  const showSymbolLaw = figures.symbolDistribution && figures.states.length !== figures.symbols.length;
  // An order-k chain's states are its k-symbol contexts; say so where states are counted.
  const stateNoun = figures.family === "markov" && figures.states.length !== figures.symbols.length ? "context" : figures.family === "graph-walk" ? "node" : "state";
  // The Monte Carlo cross-check of a hidden source compares its own (wider) interval with the bounds.
  const mcCheck = checksFor(verification, "entropyRate").find((c) => c.relation === "overlap" && c.interval);
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <Figure title="Entropy rate" id="fig-rate">
        {figures.entropyRate ? (
          <table className="mp-kv figures">
            <tbody>
              <tr>
                <th scope="row">bits/symbol</th>
                <td className="font-mono">{formatRate(figures.entropyRate, "bits", 12)}</td>
              </tr>
              <tr>
                <th scope="row">nats/symbol</th>
                <td className="font-mono">{formatRate(figures.entropyRate, "nats", 12)}</td>
              </tr>
            </tbody>
          </table>
        ) : (
          <p className="text-sm">{figures.message}</p>
        )}
        {hidden && <p className="mt-1 text-xs text-ink-soft">The midpoint of the last sandwich bounds (see the bounds table).</p>}
        <VerificationStatus checks={checksFor(verification, "entropyRate")} label="The entropy rate" />
      </Figure>

      <Figure title="Min-entropy rate" id="fig-min">
        {figures.minEntropyRate ? (
          <>
            <p className="font-mono figures">
              {formatRate(figures.minEntropyRate, unit, 12)} <span className="font-sans text-sm">{u}</span>
            </p>
            <p className="mt-1 text-xs text-ink-soft">Minus the maximum mean cycle of log Pᵢⱼ: the rate of the single most likely long path.</p>
            <VerificationStatus checks={checksFor(verification, "minEntropyRate")} label="The min-entropy rate" />
            <MinEntropyCaution />
          </>
        ) : (
          <p className="text-sm text-ink-soft">{hidden ? "Not computed for hidden sources: there is no finite formula; only the Shannon rate is bracketed." : "Not defined: there is no single closed class."}</p>
        )}
      </Figure>

      <Figure title="Rényi entropy rates" id="fig-renyi">
        {figures.renyi.length ? (
          <>
            <table className="mp-kv figures">
              <thead>
                <tr>
                  <th scope="col">order α</th>
                  <th scope="col">rate ({u})</th>
                </tr>
              </thead>
              <tbody>
                {figures.renyi.map((r) => (
                  <tr key={r.order}>
                    <th scope="row" className="font-mono">
                      {r.order}
                    </th>
                    <td className="font-mono">{formatFixed(unit === "bits" ? r.bits : r.nats, 9)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <VerificationStatus checks={checksFor(verification, "renyi")} label="Each Rényi rate" />
          </>
        ) : (
          <p className="text-sm text-ink-soft">{hidden ? "Not computed for hidden sources." : "None stored."}</p>
        )}
      </Figure>

      <Figure title="Class structure" id="fig-classes">
        <ul className="space-y-1 text-sm">
          {figures.classes.map((c, i) => (
            <li key={i}>
              <span className="font-semibold">{c.closed ? "Closed class" : "Transient class"}</span>{" "}
              <span className="text-ink-soft">
                ({c.states.length} {stateNoun}{c.states.length === 1 ? "" : "s"}, {c.period === 1 ? "aperiodic" : c.period === 0 ? "no return" : `period ${c.period}`})
              </span>
              : <span className="font-mono text-xs">{c.states.slice(0, 12).map((s) => figures.states[s]).join(", ")}{c.states.length > 12 ? ", …" : ""}</span>
            </li>
          ))}
        </ul>
        <p className="mt-2 text-sm">
          {figures.irreducible ? "Irreducible" : "Reducible"}; {figures.period === null ? "period given per class" : figures.period === 1 ? "aperiodic" : `period ${figures.period}`}.
        </p>
        <VerificationStatus checks={[]} label="The class structure" exact="is exact: it is read off the graph of positive transitions" />
      </Figure>

      <div className="md:col-span-2">
        <Figure title="Stationary distribution" id="fig-mu">
          {mu ? (
            <div className="grid gap-4 lg:grid-cols-2">
              <div className="mp-scroll mp-scroll-short card" tabIndex={0} role="region" aria-label="Stationary distribution (scrolls)">
                <table className="mp-table font-mono figures text-xs">
                  <caption className="sr-only">Stationary distribution μ in state order</caption>
                  <thead>
                    <tr>
                      <th scope="col" className="font-sans">
                        state
                      </th>
                      <th scope="col">μ</th>
                    </tr>
                  </thead>
                  <tbody>
                    {figures.states.map((s, i) => (
                      <tr key={s} className={i >= PRINT_ROWS ? "mp-print-extra" : undefined}>
                        <th scope="row">{s}</th>
                        <td style={{ background: heatColour(maxMu > 0 ? mu[i] / maxMu : 0) }}>{formatFixed(mu[i], 9)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
              <div>
                {showSymbolLaw && figures.symbolDistribution && (
                  <table className="mp-kv figures text-sm">
                    <caption className="text-left text-xs text-ink-soft">Distribution of one emitted symbol</caption>
                    <tbody>
                      {figures.symbols.map((s, i) => (
                        <tr key={s}>
                          <th scope="row" className="font-mono">
                            {s}
                          </th>
                          <td className="font-mono">{formatFixed(figures.symbolDistribution![i], 9)}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                )}
                <p className="mt-2 text-xs text-ink-soft">
                  Solver: {figures.solver.method}; residual ‖μP − μ‖₁ = <span className="font-mono">{formatSmall(figures.solver.residual)}</span>.
                </p>
                <VerificationStatus checks={[...checksFor(verification, "stationary"), ...checksFor(verification, "solver")]} label="The stationary distribution" exact={figures.family === "iid" ? "is needed: for an i.i.d. source it is p itself" : undefined} />
              </div>
            </div>
          ) : (
            <p className="text-sm">{figures.message}</p>
          )}
        </Figure>
      </div>

      {hidden && figures.bounds && (
        <div className="md:col-span-2">
          <Figure title="Hidden-source bounds" id="fig-bounds">
            <p className="text-xs text-ink-soft">
              H(Yₙ | Yⁿ⁻¹, X₁) ≤ H ≤ H(Yₙ | Yⁿ⁻¹), computed exactly for each n, in {u}.
            </p>
            <div className="mp-scroll mp-scroll-short card mt-2" tabIndex={0} role="region" aria-label="Bounds table (scrolls)">
              <table className="mp-table font-mono figures text-xs">
                <caption className="sr-only">Sandwich bounds by block length n</caption>
                <thead>
                  <tr>
                    <th scope="col">n</th>
                    <th scope="col">lower</th>
                    <th scope="col">upper</th>
                    <th scope="col">width</th>
                  </tr>
                </thead>
                <tbody>
                  {figures.bounds.map((b) => (
                    <tr key={b.n}>
                      <th scope="row">{b.n}</th>
                      <td>{formatFixed(fromBits(b.lower, unit), 9)}</td>
                      <td>{formatFixed(fromBits(b.upper, unit), 9)}</td>
                      <td>{formatSpread(fromBits(b.upper - b.lower, unit))}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            {figures.monteCarlo && (
              <p className="mt-2 text-sm">
                Monte Carlo estimate (seed {figures.monteCarlo.seed}, {figures.monteCarlo.runs} runs of {figures.monteCarlo.length} symbols):{" "}
                <span className="font-mono figures">{formatFixed(fromBits(figures.monteCarlo.estimateBits, unit), 6)}</span> {u}, 95% interval{" "}
                <span className="font-mono figures">
                  [{formatFixed(fromBits(figures.monteCarlo.ci95[0], unit), 6)}, {formatFixed(fromBits(figures.monteCarlo.ci95[1], unit), 6)}]
                </span>
                .
                {mcCheck?.interval && (
                  <>
                    {" "}
                    Its check against the bounds uses the wider interval{" "}
                    <span className="font-mono figures">
                      [{formatFixed(fromBits(mcCheck.interval[0], unit), 6)}, {formatFixed(fromBits(mcCheck.interval[1], unit), 6)}]
                    </span>{" "}
                    stored with the verification (see the checks behind the entropy rate).
                  </>
                )}
              </p>
            )}
            <VerificationStatus checks={checksFor(verification, "bounds")} label="The bounds" />
          </Figure>
        </div>
      )}

      {figures.notes.length > 0 && (
        <div className="md:col-span-2">
          <h3 className="text-sm font-bold">Notes from the engine</h3>
          <ul className="mt-1 list-disc pl-5 text-sm text-ink-soft">
            {figures.notes.map((n, i) => (
              <li key={i}>{tidyNumbersInText(n)}</li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
