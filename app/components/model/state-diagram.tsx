/**
 * The state-transition diagram: mermaid 11, in the browser only (loaded inside an effect), with the
 * adjacency list as the server-rendered fallback and the only view for large models.
 */
import { useEffect, useId, useState } from "react";
import type { ModelParams } from "~/engine/schema";
import { DIAGRAM_EDGE_LIMIT, DIAGRAM_STATE_LIMIT, adjacencyLines, mermaidSource, transitionGraph } from "./transitions";

export function StateDiagram({ params, states }: { params: ModelParams; states: string[] }) {
  const graph = transitionGraph(params, states);
  const rawId = useId();
  const [svg, setSvg] = useState<string | null>(null);
  const [failed, setFailed] = useState<string | null>(null);
  const drawable = graph !== null && graph.nodes.length <= DIAGRAM_STATE_LIMIT && graph.edges.length <= DIAGRAM_EDGE_LIMIT;
  const source = graph && drawable ? mermaidSource(graph) : null;

  useEffect(() => {
    if (!source) return;
    let cancelled = false;
    (async () => {
      try {
        const { default: mermaid } = await import("mermaid");
        mermaid.initialize({
          startOnLoad: false,
          securityLevel: "strict",
          theme: "base",
          logLevel: "fatal",
          fontFamily: "Noto Sans, sans-serif",
          themeVariables: {
            primaryColor: "#fffdf8",
            primaryBorderColor: "#5a5247",
            primaryTextColor: "#26221d",
            lineColor: "#5a5247",
            edgeLabelBackground: "#f6f1e6",
            fontSize: "13px",
          },
          flowchart: { htmlLabels: false, curve: "basis" },
        });
        const id = `mp-diagram-${rawId.replace(/[^a-zA-Z0-9_-]/g, "")}`;
        const out = await mermaid.render(id, source);
        if (!cancelled) setSvg(out.svg);
      } catch (e) {
        if (!cancelled) setFailed(e instanceof Error ? e.message : String(e));
      }
    })();
    return () => {
      cancelled = true;
    };
  }, [source, rawId]);

  if (!graph) {
    return (
      <p className="text-sm text-ink-soft">
        An i.i.d. source has no state to remember: each symbol is drawn from p independently of the past, so there is no transition diagram.
      </p>
    );
  }
  const lines = adjacencyLines(graph);
  return (
    <div>
      {!drawable && (
        <p className="mb-2 text-sm text-ink-soft">
          {graph.nodes.length > DIAGRAM_STATE_LIMIT
            ? `This model has ${graph.nodes.length} states; a drawing above ${DIAGRAM_STATE_LIMIT} states is unreadable, so the diagram is given as an adjacency list.`
            : `This model has ${graph.edges.length} transitions; a drawing above ${DIAGRAM_EDGE_LIMIT} is a tangle, so the diagram is given as an adjacency list.`}
        </p>
      )}
      {drawable && (
        <div className="mp-diagram card p-2">
          {svg ? (
            <div role="img" aria-label={`State-transition diagram with ${graph.nodes.length} states; the adjacency list below gives the same information as text.`} dangerouslySetInnerHTML={{ __html: svg }} />
          ) : (
            <p className="p-4 text-sm text-ink-soft">{failed ? `The diagram could not be drawn (${failed}); the adjacency list below has the same information.` : "Drawing the diagram…"}</p>
          )}
        </div>
      )}
      {drawable && <p className="mt-1 text-xs text-ink-soft">Edge labels are rounded to three significant digits; the adjacency list gives them as published.</p>}
      <details className="mp-details mt-2 text-sm" open={!drawable}>
        <summary>Adjacency list ({graph.edgeMeaning}{graph.directed ? "" : "s, undirected"})</summary>
        <ul className="mp-adjacency mt-2 font-mono figures text-xs">
          {lines.map((l) => (
            <li key={l.state}>
              <span className="font-semibold">{l.state}</span> {graph.directed ? "→" : "—"}{" "}
              {l.targets.map((t, i) => (
                <span key={i}>
                  {i > 0 && ", "}
                  {t.label} <span className="text-ink-soft">{t.value}</span>
                </span>
              ))}
            </li>
          ))}
        </ul>
      </details>
    </div>
  );
}
