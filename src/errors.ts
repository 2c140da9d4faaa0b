/**
 * The one error type the engine throws for anything a user can fix: a stable lower-case code
 * (the protocol's `error.code`), one sentence a person can act on, and optionally the place in the
 * request it concerns. Layers below `ops` leave `path` relative (e.g. "matrix[1][0]"); the ops layer
 * prefixes the argument name. Programming errors stay ordinary exceptions.
 */
export type ErrorCode =
  | 'not-hermitian'
  | 'not-positive'
  | 'trace-not-one'
  | 'dimension-mismatch'
  | 'parse-error'
  | 'unknown-op'
  | 'unknown-family'
  | 'invalid-argument'
  | 'missing-argument'
  | 'too-large'
  | 'not-completely-positive'
  | 'not-trace-preserving'
  | 'solver-failed'
  /** The request ran past its deadline (milliseconds; see docs/protocol.md, "Limits and deadlines"). */
  | 'deadline-exceeded'
  /** The caller cancelled the request (a front end's cancel button; the engine client answers this itself). */
  | 'cancelled'
  | 'internal-error';

export class RhoError extends Error {
  readonly code: ErrorCode;
  readonly path?: string;
  /** Optional structured detail (the eigenvalue at fault, the size of a violation, ...). */
  readonly detail?: Record<string, unknown>;

  constructor(code: ErrorCode, message: string, path?: string, detail?: Record<string, unknown>) {
    super(message);
    this.name = 'RhoError';
    this.code = code;
    this.path = path;
    this.detail = detail;
  }

  /** The same error with `prefix` put before its path ("rho" + "matrix[1][0]" → "rho.matrix[1][0]"). */
  under(prefix: string): RhoError {
    const path = this.path ? (this.path.startsWith('[') ? prefix + this.path : `${prefix}.${this.path}`) : prefix;
    return new RhoError(this.code, this.message, path, this.detail);
  }
}
