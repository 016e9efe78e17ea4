/**
 * Communicating classes, closedness and periods of a Markov chain's transition graph.
 */
import type { DenseMatrix, SparseMatrix } from "./types";
import { checkDenseNonnegative, checkSparseNonnegative, isSparseMatrix, toSparse } from "./sparse";

/** The class structure of a chain. */
export interface Classification {
  /** Communicating classes, each sorted ascending; classes sorted by their smallest state. */
  classes: number[][];
  /** closed[c]: no transition leaves class c. */
  closed: boolean[];
  /** periods[c]: gcd of the cycle lengths within class c; 0 for a single state without a self-loop (no cycle). */
  periods: number[];
  /** classOf[state] = index into classes. */
  classOf: Int32Array;
  /** One class only. */
  irreducible: boolean;
  /** Indices into classes of the closed classes, ascending. */
  closedClasses: number[];
}

function gcd(a: number, b: number): number {
  a = Math.abs(a);
  b = Math.abs(b);
  while (b) [a, b] = [b, a % b];
  return a;
}

/**
 * Classifies the states of P: strongly connected components by Tarjan's algorithm (Tarjan 1972),
 * written iteratively with an explicit stack so 100,000+ states do not overflow the call stack;
 * then, per class, whether it is closed and its period (gcd over in-class edges u→v of
 * level(u) + 1 − level(v), with BFS levels from one state of the class). An entry > 0 is an edge.
 * O(n + nnz) for sparse input, O(n²) for dense. Throws EngineNumericError on a malformed matrix or
 * a negative / non-finite entry.
 */
export function classify(P: DenseMatrix | SparseMatrix): Classification {
  if (isSparseMatrix(P)) checkSparseNonnegative(P);
  else checkDenseNonnegative(P);
  const S = toSparse(P);
  const n = S.n;
  const { rowPtr, col, val } = S;

  // Iterative Tarjan.
  const index = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const onStack = new Uint8Array(n);
  const stack = new Int32Array(n);
  let sp = 0;
  const callV = new Int32Array(n); // DFS call stack: vertex
  const callP = new Int32Array(n); // and its next edge position
  const comp = new Int32Array(n).fill(-1);
  let nComp = 0;
  let counter = 0;
  for (let root = 0; root < n; root++) {
    if (index[root] !== -1) continue;
    let depth = 0;
    callV[0] = root;
    callP[0] = rowPtr[root];
    index[root] = low[root] = counter++;
    stack[sp++] = root;
    onStack[root] = 1;
    while (depth >= 0) {
      const v = callV[depth];
      let p = callP[depth];
      let descended = false;
      while (p < rowPtr[v + 1]) {
        const w = col[p];
        const x = val[p];
        p++;
        if (!(x > 0)) continue;
        if (index[w] === -1) {
          callP[depth] = p;
          depth++;
          callV[depth] = w;
          callP[depth] = rowPtr[w];
          index[w] = low[w] = counter++;
          stack[sp++] = w;
          onStack[w] = 1;
          descended = true;
          break;
        } else if (onStack[w] && index[w] < low[v]) {
          low[v] = index[w];
        }
      }
      if (descended) continue;
      // v is finished.
      if (low[v] === index[v]) {
        let w: number;
        do {
          w = stack[--sp];
          onStack[w] = 0;
          comp[w] = nComp;
        } while (w !== v);
        nComp++;
      }
      depth--;
      if (depth >= 0) {
        const u = callV[depth];
        if (low[v] < low[u]) low[u] = low[v];
      }
    }
  }

  // Renumber components by their smallest state (scanning states in order does exactly that).
  const renum = new Int32Array(nComp).fill(-1);
  let next = 0;
  const classOf = new Int32Array(n);
  const classes: number[][] = [];
  for (let s = 0; s < n; s++) {
    const c = comp[s];
    if (renum[c] === -1) {
      renum[c] = next++;
      classes.push([]);
    }
    classOf[s] = renum[c];
    classes[renum[c]].push(s);
  }

  // Closedness.
  const closed = new Array<boolean>(next).fill(true);
  for (let u = 0; u < n; u++) {
    const cu = classOf[u];
    for (let p = rowPtr[u]; p < rowPtr[u + 1]; p++) {
      if (val[p] > 0 && classOf[col[p]] !== cu) closed[cu] = false;
    }
  }

  // Periods: BFS within each class.
  const level = new Int32Array(n).fill(-1);
  const queue = new Int32Array(n);
  const periods = new Array<number>(next).fill(0);
  for (let c = 0; c < next; c++) {
    const start = classes[c][0];
    let head = 0;
    let tail = 0;
    queue[tail++] = start;
    level[start] = 0;
    let g = 0;
    while (head < tail) {
      const u = queue[head++];
      for (let p = rowPtr[u]; p < rowPtr[u + 1]; p++) {
        if (!(val[p] > 0)) continue;
        const w = col[p];
        if (classOf[w] !== c) continue;
        if (level[w] === -1) {
          level[w] = level[u] + 1;
          queue[tail++] = w;
        } else {
          g = gcd(g, level[u] + 1 - level[w]);
        }
      }
    }
    periods[c] = g;
  }

  const closedClasses: number[] = [];
  for (let c = 0; c < next; c++) if (closed[c]) closedClasses.push(c);
  return { classes, closed, periods, classOf, irreducible: next === 1, closedClasses };
}
