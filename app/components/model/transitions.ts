/**
 * The transition graph of a model, as the state diagram and its text fallback draw it. Pure and
 * client-safe; built from the stored parameters (no engine computation).
 */
import type { Label, ModelParams } from "~/engine/schema";
import { formatParam } from "./format";

/** Above this many states only the text adjacency list is shown (a drawing would be unreadable). */
export const DIAGRAM_STATE_LIMIT = 30;
/** Above this many edges a drawing is a tangle too, whatever the state count. */
export const DIAGRAM_EDGE_LIMIT = 48;

export interface TransitionGraph {
  /** State labels (contexts for order-k chains, nodes, hidden states). */
  nodes: string[];
  edges: { from: number; to: number; value: number }[];
  /** False for a walk on an undirected graph (edges carry weights, not probabilities). */
  directed: boolean;
  /** What the edge numbers are. */
  edgeMeaning: string;
}

const text = (l: Label) => (typeof l === "number" ? String(l) : l);

/**
 * The graph of positive transitions. Order-k chains are drawn on their contexts: from context
 * (x₁…x_k) the next symbol y leads to (x₂…x_k y). i.i.d. sources have no state graph (null).
 * O(m^(k+1)) for order-k chains, O(edges) otherwise.
 */
export function transitionGraph(params: ModelParams, stateLabels: readonly string[]): TransitionGraph | null {
  switch (params.family) {
    case "iid":
      return null;
    case "two-state": {
      const { a, b } = params;
      const edges = [
        { from: 0, to: 0, value: 1 - a },
        { from: 0, to: 1, value: a },
        { from: 1, to: 0, value: b },
        { from: 1, to: 1, value: 1 - b },
      ].filter((e) => e.value > 0);
      return { nodes: params.alphabet.map(text), edges, directed: true, edgeMeaning: "transition probability" };
    }
    case "markov": {
      const m = params.alphabet.length;
      const nodes = [...stateLabels];
      const edges: TransitionGraph["edges"] = [];
      if (params.transitions) {
        for (const [i, j, p] of params.transitions) if (p > 0) edges.push({ from: i, to: j, value: p });
      } else if (params.P) {
        const count = params.P.length;
        params.P.forEach((row, c) =>
          row.forEach((p, y) => {
            if (p > 0) edges.push({ from: c, to: (c * m + y) % count, value: p });
          }),
        );
      }
      return { nodes, edges, directed: true, edgeMeaning: "transition probability" };
    }
    case "graph-walk": {
      const index = new Map(params.nodes.map((n, i) => [text(n), i]));
      const edges = params.edges
        .filter((e) => e[2] > 0)
        .map(([u, v, w]) => ({ from: index.get(text(u)) ?? 0, to: index.get(text(v)) ?? 0, value: w }));
      return { nodes: params.nodes.map(text), edges, directed: false, edgeMeaning: "edge weight" };
    }
    case "hidden": {
      const edges: TransitionGraph["edges"] = [];
      params.P.forEach((row, i) => row.forEach((p, j) => p > 0 && edges.push({ from: i, to: j, value: p })));
      return { nodes: params.states.map(text), edges, directed: true, edgeMeaning: "hidden-state transition probability" };
    }
  }
}

/**
 * An edge number for a drawing: 3 significant digits, except that a probability never reads as a
 * certainty it is not (0.999999 stays 0.999999, not 1).
 */
export function diagramLabel(x: number): string {
  const r = Number(x.toPrecision(3));
  if ((r === 1 && x !== 1) || (r === 0 && x !== 0)) return formatParam(Number(x.toPrecision(6)));
  const s = formatParam(r);
  return s.includes("e") ? r.toExponential(2).replace("e+", "e") : s;
}

/** Mermaid-safe quoted text: quotes and angle brackets as entities (labels are user text). */
function quoted(s: string): string {
  return `"${s.replace(/&/g, "#amp;").replace(/"/g, "#quot;").replace(/</g, "#lt;").replace(/>/g, "#gt;")}"`;
}

/** The mermaid flowchart source of a transition graph. O(nodes + edges). */
export function mermaidSource(g: TransitionGraph): string {
  const lines = ["flowchart LR"];
  g.nodes.forEach((n, i) => lines.push(`  s${i}(${quoted(n)})`));
  const arrow = g.directed ? "-->" : "---";
  for (const e of g.edges) lines.push(`  s${e.from} ${arrow}|${quoted(diagramLabel(e.value))}| s${e.to}`);
  return lines.join("\n");
}

/** The adjacency list, one line per state: "calm → calm 0.8, swell 0.2". O(nodes + edges). */
export function adjacencyLines(g: TransitionGraph): { state: string; targets: { label: string; value: string }[] }[] {
  const out = g.nodes.map((state) => ({ state, targets: [] as { label: string; value: string }[] }));
  for (const e of g.edges) {
    out[e.from]?.targets.push({ label: g.nodes[e.to], value: formatParam(e.value) });
    if (!g.directed && e.from !== e.to) out[e.to]?.targets.push({ label: g.nodes[e.from], value: formatParam(e.value) });
  }
  return out;
}
