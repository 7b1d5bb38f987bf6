// Warnings a decomposition left in its summary (dimension at the search bound, FastICA not
// converged; lib/decomposition/pipeline.ts), read back for the runs table and the desk. No server
// imports: the runs table (a client component) uses WARNING_SHORT.

export interface DecompositionWarning {
  code: string;
  message: string;
}

/** Short words for a warning code, shown beside the component count. */
export const WARNING_SHORT: Record<string, string> = {
  dimension_at_bound: 'k at its bound',
  ica_not_converged: 'not converged',
};

/** The warnings array of a stored summary (JSON text or parsed; the whole summary or only its warnings); [] when none. */
export function decompositionWarnings(value: unknown): DecompositionWarning[] {
  let parsed: unknown = value;
  if (typeof value === 'string' || (typeof Buffer !== 'undefined' && Buffer.isBuffer(value))) {
    try {
      parsed = JSON.parse(String(value));
    } catch {
      return [];
    }
  }
  const list = Array.isArray(parsed) ? parsed : parsed && typeof parsed === 'object' ? (parsed as { warnings?: unknown }).warnings : null;
  if (!Array.isArray(list)) return [];
  return list
    .filter(
      (w): w is DecompositionWarning =>
        !!w &&
        typeof w === 'object' &&
        typeof (w as DecompositionWarning).code === 'string' &&
        typeof (w as DecompositionWarning).message === 'string',
    )
    .map((w) => ({ code: w.code, message: w.message }));
}
