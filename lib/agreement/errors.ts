/** Reasons the agreement library refuses an input; each AgreementError carries one. */
export type AgreementErrorCode =
  'too_few_raters' | 'too_few_categories' | 'unknown_category' | 'unknown_rater' | 'duplicate_vote' | 'bad_input';

/**
 * Typed error for inputs the agreement statistics cannot work with at all (as opposed to a
 * statistic that is merely undefined for the data, which is returned as `{ value: null, reason }`).
 * The message says what is wrong so it can be shown as-is in the web app and the CLI.
 */
export class AgreementError extends Error {
  readonly code: AgreementErrorCode;

  constructor(code: AgreementErrorCode, message: string) {
    super(message);
    this.name = 'AgreementError';
    this.code = code;
  }
}
