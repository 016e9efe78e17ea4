/**
 * Sparse (CSR) matrix helpers and the shape checks shared by the Markov-chain numerics.
 */
import type { DenseMatrix, SparseMatrix } from "./types";

/**
 * A numerical precondition failed (reducible chain, bad shape, non-finite entry, α = 1 …).
 * Defined here, at the bottom of the module graph, and re-exported by stationary.ts.
 */
export class EngineNumericError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "EngineNumericError";
  }
}

/** Whether a matrix argument is in CSR form. O(1). */
export function isSparseMatrix(P: DenseMatrix | SparseMatrix): P is SparseMatrix {
  return (P as SparseMatrix).rowPtr !== undefined;
}

/**
 * Checks a dense matrix's shape and that every entry is finite and ≥ 0. O(n²).
 * Throws EngineNumericError naming the first offending entry.
 */
export function checkDenseNonnegative(P: DenseMatrix, what = "matrix"): void {
  const n = P.n;
  if (!Number.isInteger(n) || n < 1) throw new EngineNumericError(`${what}: size must be a positive integer, got ${n}`);
  if (!(P.data instanceof Float64Array) || P.data.length !== n * n) {
    throw new EngineNumericError(`${what}: expected ${n * n} entries for ${n} states, got ${P.data?.length}`);
  }
  const d = P.data;
  for (let k = 0; k < d.length; k++) {
    const x = d[k];
    if (!(x >= 0) || x === Infinity) {
      throw new EngineNumericError(`${what}: entry (${Math.floor(k / n)}, ${k % n}) is ${x}; entries must be finite and ≥ 0`);
    }
  }
}

/**
 * Checks a CSR matrix's structure (monotone row pointers, column indices in range) and that every
 * stored value is finite and ≥ 0. O(n + nnz). Throws EngineNumericError naming the problem.
 */
export function checkSparseNonnegative(P: SparseMatrix, what = "matrix"): void {
  const n = P.n;
  if (!Number.isInteger(n) || n < 1) throw new EngineNumericError(`${what}: size must be a positive integer, got ${n}`);
  const { rowPtr, col, val } = P;
  if (!(rowPtr instanceof Int32Array) || rowPtr.length !== n + 1 || rowPtr[0] !== 0) {
    throw new EngineNumericError(`${what}: rowPtr must be an Int32Array of length ${n + 1} starting at 0`);
  }
  const nnz = rowPtr[n];
  if (!(col instanceof Int32Array) || !(val instanceof Float64Array) || col.length < nnz || val.length < nnz) {
    throw new EngineNumericError(`${what}: col/val must hold ${nnz} entries`);
  }
  for (let i = 0; i < n; i++) {
    if (rowPtr[i + 1] < rowPtr[i]) throw new EngineNumericError(`${what}: rowPtr decreases at row ${i}`);
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const j = col[p];
      if (!(j >= 0 && j < n)) throw new EngineNumericError(`${what}: row ${i} has column index ${j} out of range`);
      const x = val[p];
      if (!(x >= 0) || x === Infinity) {
        throw new EngineNumericError(`${what}: entry (${i}, ${j}) is ${x}; entries must be finite and ≥ 0`);
      }
    }
  }
}

/** Converts a dense matrix to CSR, dropping zeros; columns ascend within a row. O(n²). Never throws. */
export function denseToSparse(P: DenseMatrix): SparseMatrix {
  const n = P.n;
  const d = P.data;
  let nnz = 0;
  for (let k = 0; k < n * n; k++) if (d[k] !== 0) nnz++;
  const rowPtr = new Int32Array(n + 1);
  const col = new Int32Array(nnz);
  const val = new Float64Array(nnz);
  let p = 0;
  for (let i = 0; i < n; i++) {
    const r = i * n;
    for (let j = 0; j < n; j++) {
      const x = d[r + j];
      if (x !== 0) {
        col[p] = j;
        val[p] = x;
        p++;
      }
    }
    rowPtr[i + 1] = p;
  }
  return { n, rowPtr, col, val };
}

/** A CSR view of either form (dense input is converted, sparse returned as is). O(n²) or O(1). */
export function toSparse(P: DenseMatrix | SparseMatrix): SparseMatrix {
  return isSparseMatrix(P) ? P : denseToSparse(P);
}

/**
 * Builds a CSR matrix from (row, col, value) triples, summing duplicates; columns ascend within
 * each row. Explicit zeros that remain after summing are dropped. O(nnz + n) plus a per-row sort.
 * Throws EngineNumericError on mismatched lengths or indices out of range.
 */
export function sparseFromTriples(n: number, rows: Int32Array, cols: Int32Array, vals: Float64Array): SparseMatrix {
  if (!Number.isInteger(n) || n < 1) throw new EngineNumericError(`size must be a positive integer, got ${n}`);
  const m = rows.length;
  if (cols.length !== m || vals.length !== m) {
    throw new EngineNumericError(`triples: rows, cols and vals must have the same length (${m}, ${cols.length}, ${vals.length})`);
  }
  // Counting sort by row (stable), then sort each row's columns and merge duplicates.
  const count = new Int32Array(n + 1);
  for (let t = 0; t < m; t++) {
    const i = rows[t];
    const j = cols[t];
    if (!(i >= 0 && i < n) || !(j >= 0 && j < n)) throw new EngineNumericError(`triple ${t}: index (${i}, ${j}) out of range for ${n} states`);
    if (Number.isNaN(vals[t])) throw new EngineNumericError(`triple ${t}: value is NaN`);
    count[i + 1]++;
  }
  for (let i = 0; i < n; i++) count[i + 1] += count[i];
  const next = count.slice(0, n);
  const c1 = new Int32Array(m);
  const v1 = new Float64Array(m);
  for (let t = 0; t < m; t++) {
    const q = next[rows[t]]++;
    c1[q] = cols[t];
    v1[q] = vals[t];
  }
  const rowPtr = new Int32Array(n + 1);
  const col = new Int32Array(m);
  const val = new Float64Array(m);
  // markRow[j] = last row that wrote column j, markPos[j] = where (in that row's output).
  const markRow = new Int32Array(n).fill(-1);
  const markPos = new Int32Array(n);
  let p = 0;
  for (let i = 0; i < n; i++) {
    const start = p;
    for (let q = count[i]; q < count[i + 1]; q++) {
      const j = c1[q];
      if (markRow[j] === i) val[markPos[j]] += v1[q];
      else {
        markRow[j] = i;
        markPos[j] = p;
        col[p] = j;
        val[p] = v1[q];
        p++;
      }
    }
    // Sort the row by column (rows are short: insertion sort on the pair).
    for (let a = start + 1; a < p; a++) {
      const cj = col[a];
      const vj = val[a];
      let b = a - 1;
      while (b >= start && col[b] > cj) {
        col[b + 1] = col[b];
        val[b + 1] = val[b];
        b--;
      }
      col[b + 1] = cj;
      val[b + 1] = vj;
    }
    // Drop entries that summed to zero.
    let w = start;
    for (let a = start; a < p; a++) {
      if (val[a] !== 0) {
        col[w] = col[a];
        val[w] = val[a];
        w++;
      }
    }
    p = w;
    rowPtr[i + 1] = p;
  }
  return { n, rowPtr, col: col.slice(0, p), val: val.slice(0, p) };
}

/**
 * The submatrix of P on the given states, in the given order (e.g. a closed class, whose rows then
 * still sum to 1). O(k²) for k states. Throws EngineNumericError on an empty, repeated or out-of-range state.
 */
export function restrictDense(P: DenseMatrix, states: number[]): DenseMatrix {
  const n = P.n;
  const k = states.length;
  if (k < 1) throw new EngineNumericError("restrictDense: no states given");
  const seen = new Uint8Array(n);
  for (const s of states) {
    if (!Number.isInteger(s) || s < 0 || s >= n) throw new EngineNumericError(`restrictDense: state ${s} out of range for ${n} states`);
    if (seen[s]) throw new EngineNumericError(`restrictDense: state ${s} given twice`);
    seen[s] = 1;
  }
  const data = new Float64Array(k * k);
  for (let a = 0; a < k; a++) {
    const r = states[a] * n;
    for (let b = 0; b < k; b++) data[a * k + b] = P.data[r + states[b]];
  }
  return { n: k, data };
}

/** The transpose of a CSR matrix (CSR of Pᵀ, i.e. CSC of P); columns ascend within each row. O(n + nnz). */
export function transposeSparse(P: SparseMatrix): SparseMatrix {
  const n = P.n;
  const nnz = P.rowPtr[n];
  const rowPtr = new Int32Array(n + 1);
  for (let p = 0; p < nnz; p++) rowPtr[P.col[p] + 1]++;
  for (let i = 0; i < n; i++) rowPtr[i + 1] += rowPtr[i];
  const next = rowPtr.slice(0, n);
  const col = new Int32Array(nnz);
  const val = new Float64Array(nnz);
  for (let i = 0; i < n; i++) {
    for (let p = P.rowPtr[i]; p < P.rowPtr[i + 1]; p++) {
      const q = next[P.col[p]]++;
      col[q] = i;
      val[q] = P.val[p];
    }
  }
  return { n, rowPtr, col, val };
}

/** The dense form of a CSR matrix (duplicates summed). O(n² + nnz). */
export function sparseToDense(P: SparseMatrix): DenseMatrix {
  const n = P.n;
  const data = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let p = P.rowPtr[i]; p < P.rowPtr[i + 1]; p++) data[i * n + P.col[p]] += P.val[p];
  return { n, data };
}
