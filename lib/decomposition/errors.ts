// Typed errors of the decomposition core (PCA + spatial FastICA).

export type DecompositionErrorCode =
  'bad_input' | 'bad_option' | 'too_few_volumes' | 'empty_mask' | 'grid_mismatch' | 'rank_deficient' | 'worker_failed';

/** An error a user can act on: the message says what was wrong and what to do. */
export class DecompositionError extends Error {
  readonly code: DecompositionErrorCode;
  constructor(code: DecompositionErrorCode, message: string) {
    super(message);
    this.name = 'DecompositionError';
    this.code = code;
  }
}
