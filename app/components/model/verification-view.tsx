/**
 * A figure's verification status in words and an icon (never by colour alone), with a disclosure
 * that shows both routes' methods and values, the difference and the tolerance.
 */
import type { VerificationCheck, VerificationRecord } from "~/engine/verification";
import { formatSmall, formatTolerance } from "./format";

/** The checks of one figure: `entropyRate` matches entropyRate.bits and entropyRate.nats, `renyi` every order. */
export function checksFor(record: VerificationRecord | null | undefined, key: string): VerificationCheck[] {
  if (!record) return [];
  return record.checks.filter((c) => c.figure === key || c.figure.startsWith(`${key}.`) || c.figure.startsWith(`${key}[`));
}

function summary(checks: VerificationCheck[]): { ok: boolean; words: string } {
  const failed = checks.filter((c) => !c.passed);
  if (failed.length) return { ok: false, words: `Check failed: ${failed.map((c) => c.figure).join(", ")}` };
  const c = checks[0];
  const n = checks.length > 1 ? ` (${checks.length} checks)` : "";
  switch (c.relation) {
    case "equal":
      return { ok: true, words: `Verified: two routes agree within ${formatTolerance(c.tolerance)}${n}` };
    case "within":
      return { ok: true, words: `Verified: inside the bracket a second route gives${n}` };
    case "at most":
      return { ok: true, words: `Verified: the first route does not exceed the second${n}` };
    case "overlap":
      return { ok: true, words: `Verified: the Monte Carlo interval overlaps the bounds${n}` };
  }
}

/** "The entropy rate" → "the entropy rate"; keeps proper names such as Rényi. */
function lowerFirst(s: string): string {
  return s.charAt(0).toLowerCase() + s.slice(1);
}

function Icon({ ok }: { ok: boolean }) {
  return ok ? (
    <svg viewBox="0 0 16 16" className="h-4 w-4 shrink-0" aria-hidden="true">
      <circle cx="8" cy="8" r="7" fill="none" stroke="currentColor" strokeWidth="1.6" />
      <path d="M4.6 8.3l2.2 2.2 4.6-4.8" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" strokeLinejoin="round" />
    </svg>
  ) : (
    <svg viewBox="0 0 16 16" className="h-4 w-4 shrink-0" aria-hidden="true">
      <path d="M8 1.5l7 13H1z" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinejoin="round" />
      <path d="M8 6v4M8 12v.5" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
    </svg>
  );
}

const relationWords: Record<VerificationCheck["relation"], string> = {
  equal: "the two values must agree within the tolerance",
  within: "route 1 must lie inside the interval route 2 establishes",
  "at most": "route 1 must not exceed route 2",
  overlap: "the two intervals must overlap",
};

/** Status line plus the disclosure of every check behind it. */
export function VerificationStatus({ checks, label, exact }: { checks: VerificationCheck[]; label: string; exact?: string }) {
  if (checks.length === 0) {
    return (
      <p className="mp-status text-xs text-ink-soft">
        No second route: {lowerFirst(label)} {exact ?? "is not a rounded figure"}.
      </p>
    );
  }
  const s = summary(checks);
  return (
    <div className="mp-status">
      <p className={`flex items-center gap-1.5 text-xs font-semibold ${s.ok ? "text-ok" : "text-bad"}`}>
        <Icon ok={s.ok} />
        <span>{s.words}</span>
      </p>
      <details className="mp-details mt-1 text-xs">
        <summary>Checks behind {lowerFirst(label)}</summary>
        <div className="mt-2 space-y-3">
          {checks.map((c, i) => (
            <div key={i} className="overflow-x-auto">
              <table className="mp-check figures">
                <caption className="text-left font-semibold">
                  <code>{c.figure}</code> — {c.passed ? "passed" : "failed"}
                </caption>
                <tbody>
                  {c.routes.map((r, k) => (
                    <tr key={k}>
                      <th scope="row">Route {k + 1}</th>
                      <td>{r.method}</td>
                      <td className="font-mono">{String(r.value)}</td>
                    </tr>
                  ))}
                  {c.interval && (
                    <tr>
                      <th scope="row">Interval</th>
                      <td>established by route 2</td>
                      <td className="font-mono">
                        [{String(c.interval[0])}, {String(c.interval[1])}]
                      </td>
                    </tr>
                  )}
                  <tr>
                    <th scope="row">Difference</th>
                    <td>{relationWords[c.relation]}</td>
                    <td className="font-mono">{formatSmall(c.difference)}</td>
                  </tr>
                  <tr>
                    <th scope="row">Tolerance</th>
                    <td>absolute {formatSmall(c.tolerance.abs)}, relative {formatSmall(c.tolerance.rel)}</td>
                    <td className="font-mono">{formatTolerance(c.tolerance)}</td>
                  </tr>
                </tbody>
              </table>
            </div>
          ))}
        </div>
      </details>
    </div>
  );
}
