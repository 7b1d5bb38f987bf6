/** "2026-12-01 14:05" in UTC, or an em dash. */
export function utcMinute(at: Date | string | null | undefined): string {
  if (!at) return '—';
  return new Date(at).toISOString().replace('T', ' ').slice(0, 16);
}

/** Bytes in binary units with one decimal (e.g. "1.5 GiB"). */
export function bytes(n: number): string {
  const units = ['B', 'KiB', 'MiB', 'GiB', 'TiB'];
  let v = n;
  let i = 0;
  while (v >= 1024 && i < units.length - 1) {
    v /= 1024;
    i++;
  }
  return i === 0 ? `${v} B` : `${v.toFixed(1)} ${units[i]}`;
}
