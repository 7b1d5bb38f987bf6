import type { StudyAgreement } from '@/lib/agreement';
import { formatStat, heat } from './format';

/** Cohen's κ for every rater pair as a symmetric heatmap table. */
export function PairMatrix({
  pairs,
  raters,
  nameOf,
}: {
  pairs: StudyAgreement['pairs'];
  raters: readonly string[];
  nameOf: (id: string) => string;
}) {
  const key = (a: string, b: string) => (a < b ? `${a}|${b}` : `${b}|${a}`);
  const byKey = new Map(pairs.map((p) => [key(p.raterA, p.raterB), p]));
  return (
    <table className="text-sm" data-testid="pair-matrix">
      <caption className="sr-only">Cohen&apos;s kappa for each pair of raters</caption>
      <thead>
        <tr>
          <th />
          {raters.map((r) => (
            <th key={r} scope="col" className="px-2 py-1 text-xs font-medium text-ink-muted">
              {nameOf(r)}
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {raters.map((a) => (
          <tr key={a}>
            <th scope="row" className="px-2 py-1 text-left text-xs font-medium text-ink-muted">
              {nameOf(a)}
            </th>
            {raters.map((b) => {
              const p = a === b ? null : byKey.get(key(a, b));
              return (
                <td
                  key={b}
                  className="h-10 w-20 border border-line text-center font-mono"
                  style={{ background: heat(p?.cohenKappa.value ?? null) }}
                  title={p ? `${p.n} shared components; ${p.cohenKappa.reason ?? p.cohenKappa.band ?? ''}` : undefined}
                >
                  {a === b ? '' : p ? formatStat(p.cohenKappa, 2) : '·'}
                </td>
              );
            })}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
