/** Stable codes for rejected estimator input; the message names the function and the fault. */
export type EstimatorErrorCode =
  | 'EMPTY_SAMPLE'
  | 'NON_FINITE_VALUE'
  | 'LENGTH_MISMATCH'
  | 'BAD_WEIGHTS'
  | 'BAD_OPTION'
  | 'BAD_STRATUM';

/** A precondition of an estimator failed; nothing was computed. */
export class EstimatorInputError extends Error {
  readonly code: EstimatorErrorCode;

  constructor(fn: string, code: EstimatorErrorCode, detail: string) {
    super(`${fn}: ${detail}`);
    this.name = 'EstimatorInputError';
    this.code = code;
  }
}
