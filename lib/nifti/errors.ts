/** Reasons a NIfTI file can be refused; each NiftiError carries one. */
export type NiftiErrorCode =
  'not_nifti' | 'truncated' | 'bad_header' | 'unsupported_datatype' | 'bad_dims' | 'too_large' | 'not_4d' | 'grid_mismatch' | 'bad_input';

/**
 * Typed error for everything the NIfTI library refuses. The message says what is wrong and what
 * the user can do about it, so it can be shown as-is in the web app and the CLI.
 */
export class NiftiError extends Error {
  readonly code: NiftiErrorCode;

  constructor(code: NiftiErrorCode, message: string) {
    super(message);
    this.name = 'NiftiError';
    this.code = code;
  }
}
