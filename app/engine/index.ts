/**
 * The engine's public entry: what the app (API routes, editors, catalog loader, CLI) uses. Pure and
 * client-safe; the same code runs on the server (authoritative) and in the browser (preview).
 */
export { ENGINE_VERSION } from "./version";
export { EngineInputError, VerificationError, type InputErrorBody, type InputIssue } from "./errors";
export {
  FAMILIES,
  LIMITS,
  computeRequestSchema,
  graphWalkParamsSchema,
  hiddenParamsSchema,
  iidParamsSchema,
  markovParamsSchema,
  modelParamsSchema,
  renyiOrdersSchema,
  twoStateParamsSchema,
  type ComputeRequest,
  type Family,
  type GraphWalkParams,
  type HiddenParams,
  type IidParams,
  type Label,
  type MarkovParams,
  type ModelParams,
  type TwoStateParams,
} from "./schema";
export { parseComputeRequest, parseModel, type ParseModelOptions, type ParseResult, type ValidComputeRequest } from "./validate";
export { contextLabel, contextLabels, liftOrderK, symbolMarginal } from "./lift";
export {
  DEFAULT_BLOCK_LENGTHS,
  DEFAULT_RENYI_ORDERS,
  DEFAULT_SEED,
  GTH_LIMIT,
  KARP_LIMIT,
  computeFigures,
  type ClassSummary,
  type ClosedClassFigures,
  type ComputeResult,
  type MonteCarloSummary,
  type RenyiFigure,
  type SolverInfo,
} from "./compute";
export {
  LIMIT_BOUND_ORDER,
  RESIDUAL_LIMIT,
  assertVerified,
  verifyFigures,
  type VerificationCheck,
  type VerificationRecord,
  type VerificationRoute,
} from "./verification";
export { MAX_SWEEP_STEPS, sweepEntropyRate, type SweepOptions, type SweepParameter, type SweepPoint } from "./sweep";
export { createRng } from "./rng";
export type { DenseMatrix, Rate, SparseMatrix, UniformSource } from "./types";
