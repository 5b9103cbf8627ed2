/**
 * Errors raised by the geostatistics engine. Every error carries a stable `code` and, where the
 * problem can be traced to one input field, the name of that field (`field`), so that the CLI,
 * the job worker and route handlers can turn it into a clear message without parsing text.
 */
export type GeostatsErrorCode =
  | "invalid-input" // wrong shape, wrong length, non-finite number, out-of-range coordinate
  | "duplicate-locations" // two stations at the same place: the kriging system is singular
  | "too-few-points" // fewer stations than the model or the drift needs
  | "singular-drift" // drift covariates collinear (or constant) among the stations used
  | "ill-conditioned" // covariance matrix numerically singular (e.g. near-duplicates without nugget)
  | "fit-failed" // variogram fit impossible (no bins, no variation, zero-distance bins with method 7)
  | "aborted"; // cancelled through an AbortSignal

export class GeostatsError extends Error {
  readonly code: GeostatsErrorCode;
  /** The input field the problem is about, e.g. "points", "drift.targets", "maxNeighbors". */
  readonly field?: string;

  constructor(code: GeostatsErrorCode, message: string, field?: string) {
    super(message);
    this.name = "GeostatsError";
    this.code = code;
    this.field = field;
  }
}

export function isGeostatsError(e: unknown): e is GeostatsError {
  return e instanceof Error && (e as { name?: string }).name === "GeostatsError" && "code" in e;
}
