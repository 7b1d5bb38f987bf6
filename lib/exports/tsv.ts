/** Tab-separated values as written in exports: a header row, "n/a" for missing values (BIDS convention). */
export type Cell = string | number | boolean | null | undefined;

export function tsvCell(v: Cell): string {
  if (v === null || v === undefined || (typeof v === 'number' && !Number.isFinite(v))) return 'n/a';
  if (typeof v === 'boolean') return v ? '1' : '0';
  if (typeof v === 'number') return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(8)));
  return v.replace(/[\t\r\n]+/g, ' ');
}

export function toTsv(header: readonly string[], rows: readonly Cell[][]): string {
  return [header.join('\t'), ...rows.map((r) => r.map(tsvCell).join('\t'))].join('\n') + '\n';
}

/** Parses a TSV with a header row into column names and rows of strings. */
export function parseTsv(text: string): { header: string[]; rows: string[][] } {
  const lines = text.split(/\r?\n/).filter((l) => l.length > 0 && !l.startsWith('#'));
  const [head, ...rest] = lines;
  return { header: (head ?? '').split('\t'), rows: rest.map((l) => l.split('\t')) };
}
