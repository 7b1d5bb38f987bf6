import type { StatWithCI } from '@/lib/agreement';
import { countOf, formatCI, formatStat } from './format';

const NAMES = {
  krippendorffAlpha: "Krippendorff's α",
  fleissKappa: "Fleiss' κ",
  gwetAC1: "Gwet's AC1",
  pabak: 'PABAK',
  percentAgreement: 'Percent agreement',
} as const;

export function Headline({ stats }: { stats: Record<keyof typeof NAMES, StatWithCI> }) {
  return (
    <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-5" data-testid="agreement-headline">
      {(Object.keys(NAMES) as (keyof typeof NAMES)[]).map((key) => {
        const s = stats[key];
        return (
          <div key={key} className="rounded-lg border border-line bg-ground-raised p-3" data-testid={`stat-${key}`}>
            <p className="text-xs text-ink-muted">{NAMES[key]}</p>
            <p className="mt-1 font-mono text-2xl" title={s.reason}>
              {formatStat(s)}
            </p>
            <p className="text-xs text-ink-faint">{s.value == null ? s.reason : formatCI(s.ci)}</p>
            {s.band ? <p className="mt-1 text-xs text-lumen-strong">{s.band}</p> : null}
            <p className="text-xs text-ink-faint">{countOf(s.n, 'component')}</p>
          </div>
        );
      })}
    </div>
  );
}
