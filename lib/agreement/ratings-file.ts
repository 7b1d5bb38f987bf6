import { AgreementError } from './errors';
import type { Vote } from './table';

export type RatingsFileFormat = 'csv' | 'tsv';

/**
 * Splits delimited text into rows. CSV follows RFC 4180 (fields in double quotes may hold the
 * delimiter, newlines and doubled quotes); TSV is split on tabs without quoting (the IANA
 * text/tab-separated-values convention). Lines may end in LF or CRLF; blank lines are skipped.
 */
export function parseDelimited(text: string, format: RatingsFileFormat): string[][] {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (format === 'tsv') {
    return body.split(/\r?\n/).filter((l) => l.trim() !== '').map((l) => l.split('\t'));
  }
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < body.length; i++) {
    const ch = body[i];
    if (quoted) {
      if (ch === '"' && body[i + 1] === '"') { field += '"'; i++; }
      else if (ch === '"') quoted = false;
      else field += ch;
    } else if (ch === '"' && field === '') quoted = true;
    else if (ch === ',') { row.push(field); field = ''; }
    else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && body[i + 1] === '\n') i++;
      row.push(field);
      if (row.some((f) => f.trim() !== '')) rows.push(row);
      row = [];
      field = '';
    } else field += ch;
  }
  if (quoted) throw new AgreementError('bad_input', 'unterminated quoted field in CSV');
  row.push(field);
  if (row.some((f) => f.trim() !== '')) rows.push(row);
  return rows;
}

/** CSV or TSV from the file name (.csv / .tsv / .tab), else from the header line (a tab means TSV). */
export function detectFormat(fileName: string, text: string): RatingsFileFormat {
  const lower = fileName.toLowerCase();
  if (lower.endsWith('.tsv') || lower.endsWith('.tab')) return 'tsv';
  if (lower.endsWith('.csv')) return 'csv';
  const first = text.split(/\r?\n/, 1)[0] ?? '';
  return first.includes('\t') ? 'tsv' : 'csv';
}

/**
 * Long-format ratings (columns item, rater, label; header names case-insensitive, any order,
 * other columns ignored) → votes and the labels in order of first appearance. An empty label is a
 * missing vote; so is an absent row.
 */
export function parseRatingsText(text: string, format: RatingsFileFormat): { votes: Vote[]; labels: string[] } {
  const rows = parseDelimited(text, format);
  if (rows.length === 0) throw new AgreementError('bad_input', 'the file is empty');
  const head = rows[0].map((h) => h.trim().toLowerCase());
  const col = (name: string) => {
    const j = head.indexOf(name);
    if (j < 0) throw new AgreementError('bad_input', `missing column "${name}" (header has: ${head.join(', ')})`);
    return j;
  };
  const ji = col('item');
  const jr = col('rater');
  const jl = col('label');
  const votes: Vote[] = [];
  const labels: string[] = [];
  for (let t = 1; t < rows.length; t++) {
    const r = rows[t];
    const item = (r[ji] ?? '').trim();
    const rater = (r[jr] ?? '').trim();
    const label = (r[jl] ?? '').trim();
    if (!item || !rater) throw new AgreementError('bad_input', `line ${t + 1}: item and rater must not be empty`);
    if (label && !labels.includes(label)) labels.push(label);
    votes.push({ item, rater, label: label || null });
  }
  return { votes, labels };
}
