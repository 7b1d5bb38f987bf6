import { featureHints, NOT_AVAILABLE } from '@/lib/decomposition/feature-hints';
import { isLowReproducibility } from '@/lib/desk/reproducibility';
import type { ListedComponent } from '@/lib/desk/types';

/**
 * The component's features with their plain-language hints (a prompt, never a verdict). An
 * undefined feature shows "—" with the reason it is undefined; reproducibility comes first and is
 * flagged when it is below the study's threshold.
 */
export function FeaturePanel({
  component,
  k,
  reproducibilityThreshold,
}: {
  component: ListedComponent;
  k: number;
  reproducibilityThreshold?: number;
}) {
  const low = reproducibilityThreshold !== undefined && isLowReproducibility(component.features, reproducibilityThreshold);
  return (
    <section aria-labelledby="features-heading" className="rounded border border-line bg-ground-raised" data-testid="feature-panel">
      <header className="flex items-baseline justify-between border-b border-line px-3 py-1.5">
        <h2 id="features-heading" className="text-xs font-semibold uppercase tracking-wider text-ink-muted">
          Features
        </h2>
        <p className="font-mono text-xs text-ink-muted">
          <span data-testid="variance-explained">{(component.varianceExplained * 100).toFixed(1)} %</span> of variance · {component.idx} of{' '}
          {k}
        </p>
      </header>
      {low ? (
        <p
          className="border-b border-line bg-alarm/10 px-3 py-1 text-[11px] leading-snug text-alarm"
          data-testid="reproducibility-flag"
          role="note"
        >
          Low reproducibility: below the study&rsquo;s {reproducibilityThreshold!.toFixed(2)}. This component did not come back reliably
          when the decomposition was re-run; rate it with care.
        </p>
      ) : null}
      <dl className="divide-y divide-line/60">
        {Object.entries(featureHints).map(([key, hint]) => {
          const raw = component.features[key];
          const value = typeof raw === 'number' && Number.isFinite(raw) ? raw : null;
          const shown = hint.format(value);
          const undefinedValue = shown === NOT_AVAILABLE;
          const explain = undefinedValue ? `Not available: ${hint.whenUndefined}` : hint.hint;
          return (
            <div key={key} className="group grid grid-cols-[1fr_auto] gap-x-3 px-3 py-1" title={explain} data-testid={`feature-${key}`}>
              <dt className="truncate text-xs text-ink-muted">{hint.label}</dt>
              <dd
                className={`text-right font-mono text-xs tabular-nums ${key === 'reproducibility' && low ? 'font-semibold text-alarm' : undefinedValue ? 'text-ink-muted' : 'text-ink'}`}
                data-testid={`feature-${key}-value`}
              >
                {shown}
              </dd>
              <p className="col-span-2 hidden text-[11px] leading-snug text-ink-muted group-hover:block group-focus-within:block">
                {explain}
              </p>
            </div>
          );
        })}
      </dl>
    </section>
  );
}
