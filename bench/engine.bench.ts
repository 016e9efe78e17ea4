/**
 * Engine benchmark (kernels, then computeFigures end to end with verification): builds seeded inputs, runs each case several times and prints a table of
 * median / min wall time, the first run (before V8 has optimised the code) and an accuracy figure. Run with `npx tsx bench/engine.bench.ts`.
 * Scenario: chains modelled on a fictional coastal buoy telemetry network (dense state models),
 * its relay graph (sparse chains, a slowly mixing ring of relays with a small leak to the harbour
 * station) and a fictional warehouse robot's floor graph (random walk, closed form).
 */
import type { DenseMatrix, SparseMatrix } from "../app/engine/types";
import { stationaryGTH, stationaryIterative, stationaryResidual } from "../app/engine/stationary";
import { entropyRateGeneral, graphWalkClosedForm, type WeightedEdges } from "../app/engine/entropy-rate";
import { minEntropyRateHoward, minEntropyRateKarp } from "../app/engine/min-entropy";
import { renyiEntropyRate } from "../app/engine/renyi";
import { sparseFromTriples } from "../app/engine/sparse";
import { computeFigures } from "../app/engine/compute";
import { gthKernelAvailable } from "../app/engine/wasm/gth-kernel";

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function denseChain(n: number, rnd: () => number): DenseMatrix {
  const data = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < n; j++) s += data[i * n + j] = rnd() ** 3;
    for (let j = 0; j < n; j++) data[i * n + j] /= s;
  }
  return { n, data };
}

function sparseChain(n: number, perRow: number, rnd: () => number): SparseMatrix {
  const rows = new Int32Array(n * perRow);
  const cols = new Int32Array(n * perRow);
  const vals = new Float64Array(n * perRow);
  let t = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    const start = t;
    for (let k = 0; k < perRow; k++) {
      rows[t] = i;
      cols[t] = k === 0 ? (i + 1) % n : Math.floor(rnd() * n); // the ring edge keeps it irreducible
      s += vals[t] = 0.05 + rnd();
      t++;
    }
    for (let q = start; q < t; q++) vals[q] /= s;
  }
  return sparseFromTriples(n, rows, cols, vals);
}

/** Relays in a ring: each passes a reading on to either neighbour, and with a small probability back to the harbour station 0. */
function leakyRing(n: number, leak: number): SparseMatrix {
  const rows = new Int32Array(3 * n);
  const cols = new Int32Array(3 * n);
  const vals = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    rows[3 * i] = rows[3 * i + 1] = rows[3 * i + 2] = i;
    cols[3 * i] = (i + 1) % n;
    vals[3 * i] = 0.55 * (1 - leak);
    cols[3 * i + 1] = (i + n - 1) % n;
    vals[3 * i + 1] = 0.45 * (1 - leak);
    cols[3 * i + 2] = 0;
    vals[3 * i + 2] = leak;
  }
  return sparseFromTriples(n, rows, cols, vals);
}

function floorGraph(nodes: number, edges: number, rnd: () => number): WeightedEdges {
  const u = new Int32Array(edges);
  const v = new Int32Array(edges);
  const w = new Float64Array(edges);
  for (let e = 0; e < edges; e++) {
    u[e] = e < nodes ? e : Math.floor(rnd() * nodes);
    v[e] = e < nodes ? (e + 1) % nodes : Math.floor(rnd() * nodes);
    w[e] = 1 + Math.floor(rnd() * 9);
  }
  return { u, v, w };
}

interface Row {
  name: string;
  size: string;
  median: number;
  min: number;
  /** The first run's time: before V8 has optimised the code (what a fresh process pays once). */
  first: number;
  runs: number;
  accuracy: string;
}
const table: Row[] = [];

function measure(name: string, size: string, runs: number, fn: () => string): void {
  const times: number[] = [];
  let accuracy = "";
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    accuracy = fn();
    times.push(performance.now() - t0);
  }
  const first = times[0];
  times.sort((a, b) => a - b);
  table.push({ name, size, median: times[Math.floor(times.length / 2)], min: times[0], first, runs, accuracy });
  console.error(`done: ${name} ${size}`);
}

const rnd = mulberry32(20240611);

for (const [n, runs, karp] of [[64, 200, true], [64, 200, false], [512, 7, false], [2048, 3, false]] as const) {
  const P = denseChain(n, rnd);
  measure("dense: GTH + entropy rate + min-entropy", `n=${n}${karp ? " (Karp)" : " (Howard)"}`, runs, () => {
    const mu = stationaryGTH(P);
    const h = entropyRateGeneral(P, mu);
    const m = karp ? minEntropyRateKarp(P) : minEntropyRateHoward(P).rate;
    return `res ${stationaryResidual(P, mu).toExponential(1)}, H ${h.bits.toFixed(6)}, Hmin ${m.bits.toFixed(6)}`;
  });
}
{
  // The GTH elimination alone, with and without the WebAssembly kernel (the same bits either way).
  const P = denseChain(2048, mulberry32(7)); // its own seed, so the later cases' inputs stay as before
  const kernel = gthKernelAvailable() ? "WebAssembly SIMD kernel" : "kernel unavailable here, JavaScript loop";
  measure(`dense: GTH alone (${kernel})`, "n=2048", 3, () => `res ${stationaryResidual(P, stationaryGTH(P)).toExponential(1)}`);
  measure("dense: GTH alone (JavaScript loop)", "n=2048", 3, () => `res ${stationaryResidual(P, stationaryGTH(P, { kernel: "js" })).toExponential(1)}`);
}
{
  const P = denseChain(512, rnd);
  measure("dense: Howard vs Karp", "n=512", 3, () => {
    const a = minEntropyRateKarp(P).bits;
    const b = minEntropyRateHoward(P).rate.bits;
    return `|Karp − Howard| ${Math.abs(a - b).toExponential(1)}`;
  });
  measure("dense: Rényi α = 2", "n=512", 3, () => `H2 ${renyiEntropyRate(P, 2).bits.toFixed(6)}`);
}
{
  const P = sparseChain(100_000, 10, rnd);
  measure("sparse random: iterative", `n=100000 nnz=${P.rowPtr[P.n]}`, 5, () => {
    const r = stationaryIterative(P, { tolerance: 1e-12 });
    return `res ${r.residual.toExponential(1)}, it ${r.iterations}`;
  });
}
{
  const P = leakyRing(100_000, 1e-4);
  measure("sparse ring, leak 1e-4: iterative", `n=100000 nnz=${P.rowPtr[P.n]}`, 5, () => {
    const r = stationaryIterative(P, { tolerance: 1e-12 });
    return `res ${r.residual.toExponential(1)}, it ${r.iterations}`;
  });
}
{
  const G = floorGraph(200_000, 1_000_000, rnd);
  measure("graph walk: closed form", "nodes=200000 edges=1000000", 15, () => {
    const r = graphWalkClosedForm(200_000, G);
    return `H ${r.rate.bits.toFixed(6)}`;
  });
}

// Hidden-source bounds (written by another helper); loaded dynamically so the rest runs without it.
try {
  const mod = (await import("../app/engine/hidden" as string)) as {
    hiddenSourceBounds: (
      P: DenseMatrix,
      B: { states: number; symbols: number; data: Float64Array },
      mu: Float64Array,
      opts: { maxN?: number; workBudget?: number },
    ) => { bounds: { n: number; lower: number; upper: number }[]; n: number; work: number; budget: number };
  };
  const P = denseChain(4, rnd);
  const B = { states: 4, symbols: 2, data: new Float64Array([0.9, 0.1, 0.2, 0.8, 0.6, 0.4, 0.05, 0.95]) };
  const mu = stationaryGTH(P);
  measure("hidden source: sandwich bounds", "4 states, binary, n ≤ 20", 3, () => {
    const r = mod.hiddenSourceBounds(P, B, mu, { maxN: 20 });
    const last = r.bounds[r.bounds.length - 1];
    return `n ${r.n}, gap ${(last.upper - last.lower).toExponential(1)}, work ${r.work}`;
  });
} catch (e) {
  table.push({ name: "hidden source: sandwich bounds", size: "4 states, binary, n ≤ 20", median: NaN, min: NaN, first: NaN, runs: 0, accuracy: `skipped: ${(e as Error).message.split("\n")[0]}` });
}

// Product path: computeFigures end to end (validation, figures, verification), in the request form.
function transitionsOf(P: SparseMatrix): [number, number, number][] {
  const t: [number, number, number][] = [];
  for (let i = 0; i < P.n; i++) for (let p = P.rowPtr[i]; p < P.rowPtr[i + 1]; p++) t.push([i, P.col[p], P.val[p]]);
  return t;
}
function product(name: string, size: string, runs: number, request: unknown): void {
  measure(`computeFigures: ${name}`, size, runs, () => {
    const r = computeFigures(request);
    const left = r.notes.filter((x) => x.includes("not given")).length;
    return `verified ${r.verification.passed}, H ${r.entropyRate?.bits.toFixed(6)}, Rényi ${r.renyi.length} (${left} left out)`;
  });
}
for (const [n, runs] of [[64, 50], [512, 5], [2048, 2]] as const) {
  const P = denseChain(n, rnd);
  const rows = Array.from({ length: n }, (_, i) => Array.from(P.data.subarray(i * n, (i + 1) * n)));
  product("dense chain", `n=${n}`, runs, { model: { family: "markov", alphabet: rows.map((_, i) => i), P: rows }, normalize: true });
}
{
  const P = sparseChain(100_000, 10, rnd);
  product("sparse random chain", `n=100000 nnz=${P.rowPtr[P.n]}`, 2, { model: { family: "markov", alphabet: Array.from({ length: P.n }, (_, i) => i), transitions: transitionsOf(P) }, normalize: true });
}
{
  const P = leakyRing(100_000, 1e-4);
  product("sparse ring, leak 1e-4", `n=100000 nnz=${P.rowPtr[P.n]}`, 3, { model: { family: "markov", alphabet: Array.from({ length: P.n }, (_, i) => i), transitions: transitionsOf(P) }, normalize: true });
}
{
  const G = floorGraph(200_000, 1_000_000, rnd);
  const edges = Array.from(G.u, (u, e) => [u, G.v[e], G.w[e]]);
  product("graph walk", "nodes=200000 edges=1000000", 2, { model: { family: "graph-walk", nodes: Array.from({ length: 200_000 }, (_, i) => i), edges } });
}
{
  const P = denseChain(4, rnd);
  const B = [[0.9, 0.1], [0.2, 0.8], [0.6, 0.4], [0.05, 0.95]];
  const rows = Array.from({ length: 4 }, (_, i) => Array.from(P.data.subarray(i * 4, i * 4 + 4)));
  product("hidden source", "4 states, binary, n = 20", 3, { model: { family: "hidden", states: [0, 1, 2, 3], alphabet: ["0", "1"], P: rows, B }, blockLengths: 20, normalize: true });
}

const pad = (s: string, w: number) => s.padEnd(w);
console.log(`${pad("case", 52)} ${pad("size", 30)} ${pad("median ms", 10)} ${pad("min ms", 10)} ${pad("first ms", 10)} ${pad("runs", 5)} accuracy`);
for (const r of table) {
  console.log(`${pad(r.name, 52)} ${pad(r.size, 30)} ${pad(Number.isNaN(r.median) ? "-" : r.median.toFixed(2), 10)} ${pad(Number.isNaN(r.min) ? "-" : r.min.toFixed(2), 10)} ${pad(Number.isNaN(r.first) ? "-" : r.first.toFixed(2), 10)} ${pad(String(r.runs), 5)} ${r.accuracy}`);
}
