/**
 * Shared numeric types of the engine. Every module under app/engine/ uses these; none imports
 * from the rest of app/.
 */

/** A dense square matrix, row-major: entry (i, j) is data[i * n + j]. */
export interface DenseMatrix {
  n: number;
  data: Float64Array;
}

/** A sparse square matrix in compressed sparse row form: row i holds col/val[rowPtr[i] .. rowPtr[i+1]). */
export interface SparseMatrix {
  n: number;
  rowPtr: Int32Array;
  col: Int32Array;
  val: Float64Array;
}

/** A figure in both units. */
export interface Rate {
  bits: number;
  nats: number;
}

/** A seeded source of uniform numbers in [0, 1); randomness is always injected. */
export interface UniformSource {
  next(): number;
}
