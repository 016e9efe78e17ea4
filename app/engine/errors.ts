/**
 * The engine's input and verification errors. Both carry plain JSON so the API can answer with them
 * directly (422 for input, 500 for a failed verification, which is never published).
 */

/** One problem with the input: where (a path such as `model.P[2][1]`) and what, in the user's words. */
export interface InputIssue {
  path: string;
  message: string;
}

/** The error body of the compute API: `{ message, issues }`. */
export interface InputErrorBody {
  message: string;
  issues: InputIssue[];
}

/** Input the engine cannot compute with (validation failure, or a size only known after lifting). */
export class EngineInputError extends Error {
  readonly issues: InputIssue[];
  constructor(message: string, issues: InputIssue[] = []) {
    super(message);
    this.name = "EngineInputError";
    this.issues = issues;
  }
  /** The `{ message, issues }` body for the API. O(issues). */
  toJSON(): InputErrorBody {
    return { message: this.message, issues: this.issues.map((i) => ({ ...i })) };
  }
}

/** A verification check that failed; a failing check is an error, never a warning. */
export class VerificationError extends Error {
  readonly failed: { figure: string; difference: number; allowed: number }[];
  constructor(message: string, failed: { figure: string; difference: number; allowed: number }[]) {
    super(message);
    this.name = "VerificationError";
    this.failed = failed;
  }
}
