/** Summary, provenance and the published methods the figures rely on. */
import type { ModelSummary } from "~/.server/library.server";

/** The methods a catalogue entry may name (catalog/README.md), in words, with their usual references. */
export const METHOD_TEXT: Record<string, { name: string; text: string }> = {
  "iid-entropy": { name: "Entropy of an i.i.d. source", text: "H = −Σ pᵢ log pᵢ per symbol (Shannon 1948)." },
  "entropy-rate-markov": { name: "Entropy rate of a stationary Markov chain", text: "H = −Σᵢ μᵢ Σⱼ Pᵢⱼ log Pᵢⱼ; an order-k chain is lifted to its k-symbol contexts first." },
  "two-state-closed-form": { name: "Two-state closed form", text: "μ = (b, a)/(a + b) and H = (b·h(a) + a·h(b))/(a + b), with h the binary entropy." },
  "graph-walk-closed-form": { name: "Random walk on a weighted graph", text: "μᵢ = Wᵢ/2W and H = H(edge weights/2W) − H(node weights/2W)." },
  "renyi-rate": { name: "Rényi entropy rate", text: "H_α = log ρ([Pᵢⱼ^α])/(1 − α), from the Perron root of the entrywise power." },
  "min-entropy-karp": { name: "Min-entropy rate", text: "Minus the maximum mean cycle of log Pᵢⱼ, found with Karp's algorithm (Karp 1978) and checked by policy iteration." },
  "hidden-sandwich-bounds": { name: "Sandwich bounds for hidden Markov sources", text: "H(Yₙ | Yⁿ⁻¹, X₁) ≤ H ≤ H(Yₙ | Yⁿ⁻¹), computed exactly for growing n, with a seeded Monte Carlo estimate as a cross-check." },
  "gth-stationary": { name: "Stationary distribution by state reduction", text: "GTH elimination (Grassmann–Taksar–Heyman 1985): no subtractions, so small probabilities keep their accuracy." },
};

export function Provenance({ model }: { model: ModelSummary }) {
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <div>
        <h3 className="text-base font-bold">Summary</h3>
        <p className="mt-1 text-sm leading-relaxed">{model.summary}</p>
        <h3 className="mt-4 text-base font-bold">Provenance</h3>
        <p className="mt-1 text-sm leading-relaxed">{model.provenance || "No provenance note was recorded."}</p>
      </div>
      <div>
        <h3 className="text-base font-bold">Methods the figures rely on</h3>
        {model.methods.length ? (
          <dl className="mt-1 space-y-2 text-sm">
            {model.methods.map((m) => (
              <div key={m}>
                <dt className="font-semibold">{METHOD_TEXT[m]?.name ?? m}</dt>
                <dd className="text-ink-soft">{METHOD_TEXT[m]?.text ?? "See the engine's documentation."}</dd>
              </div>
            ))}
          </dl>
        ) : (
          <p className="mt-1 text-sm text-ink-soft">No methods were listed for this model.</p>
        )}
      </div>
    </div>
  );
}
