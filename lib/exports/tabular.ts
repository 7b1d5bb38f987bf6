/**
 * The one writer of tabular exports (TSV in releases, CSV for the agreement report and the audit
 * log) and the one reader of delimited text (CSV per RFC 4180, TSV). Every free-text cell goes through `guardFormula`: a cell
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

/** A delimited text that cannot be read (the message says where and why). */
export class TabularParseError extends Error {}

/**
 * Splits delimited text into rows. CSV follows RFC 4180 (fields in double quotes may hold the
 * delimiter, newlines and doubled quotes); TSV is split on tabs without quoting (the IANA
 * text/tab-separated-values convention). Lines may end in LF or CRLF; blank lines are skipped.
 */
export function parseDelimitedText(text: string, format: 'csv' | 'tsv'): string[][] {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (format === 'tsv') {
    return body
      .split(/\r?\n/)
      .filter((l) => l.trim() !== '')
      .map((l) => l.split('\t'));
  }
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < body.length; i++) {
    const ch = body[i];
    if (quoted) {
      if (ch === '"' && body[i + 1] === '"') {
        field += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else field += ch;
    } else if (ch === '"' && field === '') quoted = true;
    else if (ch === ',') {
      row.push(field);
      field = '';
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && body[i + 1] === '\n') i++;
      row.push(field);
      if (row.some((f) => f.trim() !== '')) rows.push(row);
      row = [];
      field = '';
    } else field += ch;
  }
  if (quoted) throw new TabularParseError('unterminated quoted field in CSV');
  row.push(field);
  if (row.some((f) => f.trim() !== '')) rows.push(row);
  return rows;
}

/**
 * Parses a TSV with a header row into column names and rows of strings (lines starting with # are
 * comments; blank lines are skipped).
 */
export function parseTsv(text: string): { header: string[]; rows: string[][] } {
  const uncommented = text
    .split(/\r?\n/)
    .filter((l) => !l.startsWith('#'))
    .join('\n');
  const [head, ...rest] = parseDelimitedText(uncommented, 'tsv');
  return { header: head ?? [''], rows: rest };
}
