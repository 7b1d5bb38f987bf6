import { featureHints } from '@/lib/decomposition/feature-hints';
import type { DeskComponent } from '@/lib/desk/types';

/** The component's features with their plain-language hints (a prompt, never a verdict). */
export function FeaturePanel({ component, k }: { component: DeskComponent; k: number }) {
  return (
    <section aria-labelledby="features-heading" className="rounded border border-line bg-ground-raised" data-testid="feature-panel">
      <header className="flex items-baseline justify-between border-b border-line px-3 py-1.5">
        <h2 id="features-heading" className="text-xs font-semibold uppercase tracking-wider text-ink-muted">
          Features
        </h2>
        <p className="font-mono text-xs text-ink-muted">
          <span data-testid="variance-explained">{(component.varianceExplained * 100).toFixed(1)} %</span> of variance · {component.idx} of {k}
        </p>
      </header>
      <dl className="divide-y divide-line/60">
        {Object.entries(featureHints).map(([key, hint]) => {
          const raw = component.features[key];
          const value = typeof raw === 'number' ? raw : null;
          return (
            <div key={key} className="group grid grid-cols-[1fr_auto] gap-x-3 px-3 py-1" title={hint.hint}>
              <dt className="truncate text-xs text-ink-muted">{hint.label}</dt>
              <dd className="text-right font-mono text-xs tabular-nums text-ink">{hint.format(value)}</dd>
              <p className="col-span-2 hidden text-[11px] leading-snug text-ink-muted group-hover:block group-focus-within:block">{hint.hint}</p>
            </div>
          );
        })}
      </dl>
    </section>
  );
}
