/**
 * The units toggle (bits or nats per symbol), shared by every page. The choice persists in a
 * cookie, so the server renders figures in the chosen unit from the first byte.
 */
import { createContext, useCallback, useContext, useState } from "react";

export type Unit = "bits" | "nats";
export const UNIT_COOKIE = "ergoshelf_units";

/** Reads the unit from a Cookie header (server) or document.cookie (browser); bits by default. */
export function unitFromCookie(cookieHeader: string | null | undefined): Unit {
  const m = /(?:^|;\s*)ergoshelf_units=(bits|nats)/.exec(cookieHeader ?? "");
  return m?.[1] === "nats" ? "nats" : "bits";
}

const UnitContext = createContext<{ unit: Unit; setUnit: (u: Unit) => void }>({ unit: "bits", setUnit: () => {} });

export function UnitProvider({ initial, children }: { initial: Unit; children: React.ReactNode }) {
  const [unit, setUnitState] = useState<Unit>(initial);
  const setUnit = useCallback((u: Unit) => {
    setUnitState(u);
    document.cookie = `${UNIT_COOKIE}=${u}; Path=/; Max-Age=31536000; SameSite=Lax`;
  }, []);
  return <UnitContext.Provider value={{ unit, setUnit }}>{children}</UnitContext.Provider>;
}

/** The current unit and its setter. */
export function useUnits() {
  return useContext(UnitContext);
}

/** "bits/symbol" or "nats/symbol". */
export function unitLabel(unit: Unit): string {
  return `${unit}/symbol`;
}

/** A rate in the chosen unit, with fixed digits; "—" for a missing figure. */
export function formatRate(rate: { bits: number; nats: number } | null | undefined, unit: Unit, digits = 6): string {
  if (!rate) return "—";
  const v = unit === "bits" ? rate.bits : rate.nats;
  if (!Number.isFinite(v)) return "—";
  if (v !== 0 && Math.abs(v) < 10 ** -digits) return v.toExponential(3);
  return v.toFixed(digits);
}

/** A bits-only figure converted to the chosen unit. */
export function fromBits(bits: number | null | undefined, unit: Unit): number | null {
  if (bits === null || bits === undefined || !Number.isFinite(bits)) return null;
  return unit === "bits" ? bits : bits * Math.LN2;
}

/** The toggle itself: two buttons in a labelled group, the current one pressed. */
export function UnitToggle({ className = "" }: { className?: string }) {
  const { unit, setUnit } = useUnits();
  return (
    <div role="group" aria-label="Units" className={`inline-flex overflow-hidden rounded border border-rule text-xs font-semibold ${className}`}>
      {(["bits", "nats"] as const).map((u) => (
        <button
          key={u}
          type="button"
          aria-pressed={unit === u}
          onClick={() => setUnit(u)}
          className={`px-2.5 py-1 ${unit === u ? "bg-ink text-paper" : "bg-card text-ink hover:bg-paper-deep"}`}
        >
          {u}
        </button>
      ))}
    </div>
  );
}
