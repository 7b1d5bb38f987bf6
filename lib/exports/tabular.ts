/**
 * The one writer of tabular exports (TSV in releases, CSV for the agreement report and the audit
 * log) and the reader of TSV for checks. Every free-text cell goes through `guardFormula`: a cell
 * that starts with = + - @, a tab or a carriage return is prefixed with ' so that a spreadsheet
 * shows it as text instead of running it as a formula (OWASP, "CSV Injection"). Numbers stay
 * numbers: number cells, and text cells that are a plain decimal number (e.g. "-0.1234"), are
 * written as they are.
 */
export type Cell = string | number | boolean | null | undefined;

/** What the export sidecars say about the guard (FormulaGuard). */
export const FORMULA_GUARD_NOTE =
  "Text cells that begin with =, +, -, @, a tab or a carriage return are written with a leading ' so that spreadsheets do not run them as formulas; numeric columns are unchanged.";

const PLAIN_NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

/** Prefixes ' to text a spreadsheet would read as a formula (leading = + - @ tab CR); plain numbers pass unchanged. */
export function guardFormula(text: string): string {
  return /^[=+\-@\t\r]/.test(text) && !PLAIN_NUMBER.test(text) ? `'${text}` : text;
}

/** One TSV cell: "n/a" for missing values (BIDS convention), 1/0 for booleans, tabs and line breaks in text as spaces. */
export function tsvCell(v: Cell): string {
  if (v === null || v === undefined || (typeof v === 'number' && !Number.isFinite(v))) return 'n/a';
  if (typeof v === 'boolean') return v ? '1' : '0';
  if (typeof v === 'number') return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(8)));
  return guardFormula(v.replace(/[\t\r\n]+/g, ' '));
}

/** Tab-separated values with a header row, as written in exports. */
export function toTsv(header: readonly string[], rows: readonly Cell[][]): string {
  return [header.join('\t'), ...rows.map((r) => r.map(tsvCell).join('\t'))].join('\n') + '\n';
}

/** One CSV field (RFC 4180 quoting): empty for missing values, dates as ISO 8601, objects as JSON, numbers as they are, text guarded. */
export function csvCell(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number' || typeof v === 'boolean') return String(v);
  const text = guardFormula(v instanceof Date ? v.toISOString() : typeof v === 'object' ? JSON.stringify(v) : String(v));
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One CSV line (fields joined by commas, no line end). */
export function csvLine(cells: readonly unknown[]): string {
  return cells.map(csvCell).join(',');
}

/** Parses a TSV with a header row into column names and rows of strings. */
export function parseTsv(text: string): { header: string[]; rows: string[][] } {
  const lines = text.split(/\r?\n/).filter((l) => l.length > 0 && !l.startsWith('#'));
  const [head, ...rest] = lines;
  return { header: (head ?? '').split('\t'), rows: rest.map((l) => l.split('\t')) };
}
