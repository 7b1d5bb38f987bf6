import { FORMULA_GUARD_NOTE } from './tabular';

/**
 * The release export format, written into every manifest (`format`) and sidecar (`ExportFormat`).
 * Version 2: the per-component decision table is `desc-decisions` (it was `desc-verdicts` in
 * version 1) and text cells in every TSV/CSV are guarded against spreadsheet formulas.
 */
export const EXPORT_FORMAT = 'quorum-release/2' as const;

/** What sidecars carry about the format: its version, what changed, and the formula guard. */
export const EXPORT_FORMAT_SIDECAR = {
  ExportFormat: {
    Version: EXPORT_FORMAT,
    Changes:
      'Version 2 names the per-component decision table desc-decisions (desc-verdicts in version 1) and guards text cells against spreadsheet formulas.',
  },
  FormulaGuard: FORMULA_GUARD_NOTE,
} as const;
