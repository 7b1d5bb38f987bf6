import { AgreementError } from './errors';
import type { Vote } from './table';
import { parseDelimitedText, TabularParseError } from '@/lib/exports/tabular';

export type RatingsFileFormat = 'csv' | 'tsv';

/** Rows of a CSV (RFC 4180) or TSV text; a malformed CSV is the ratings file's bad input. */
export function parseDelimited(text: string, format: RatingsFileFormat): string[][] {
  try {
    return parseDelimitedText(text, format);
  } catch (e) {
    if (e instanceof TabularParseError) throw new AgreementError('bad_input', e.message);
    throw e;
  }
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
