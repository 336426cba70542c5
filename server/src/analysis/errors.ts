/**
 * The one error class of the analysis module. `code` is stable and machine-readable;
 * the message is written for a person.
 */
export class AnalysisError extends Error {
  constructor(
    readonly code: AnalysisErrorCode,
    message: string,
  ) {
    super(message);
    this.name = 'AnalysisError';
  }
}

export type AnalysisErrorCode =
  'invalid-input' | 'invalid-settings' | 'too-few-points' | 'singular' | 'not-converged';
