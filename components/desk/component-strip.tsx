'use client';
import { memo } from 'react';
import type { ShownVote } from '@/lib/desk/use-vote';

const TONE: Record<string, string> = {
  signal: 'bg-verdict-signal',
  noise: 'bg-verdict-noise',
  uncertain: 'bg-verdict-uncertain',
};

/**
 * One cell per component, coloured by the rater's own label; the current one outlined. `numbers`
 * are the component numbers in list order (default 1..n); `lowIds` the components flagged for low
 * reproducibility (underlined).
 */
export const ComponentStrip = memo(function ComponentStrip({
  ids,
  current,
  votes,
  onPick,
  numbers,
  lowIds,
}: {
  ids: number[];
  current: number;
  votes: Map<number, ShownVote>;
  onPick: (index: number) => void;
  numbers?: number[];
  lowIds?: Set<number>;
}) {
  return (
    <nav aria-label="Components" className="flex flex-wrap gap-0.5" data-testid="component-strip">
      {ids.map((id, i) => {
        const label = votes.get(id)?.label;
        const n = numbers?.[i] ?? i + 1;
        const low = lowIds?.has(id) ?? false;
        return (
          <button
            key={id}
            type="button"
            tabIndex={-1}
            onClick={() => onPick(i)}
            aria-label={`Component ${n}${label ? `, ${label}` : ', not labelled'}${low ? ', low reproducibility' : ''}`}
            data-low-reproducibility={low ? 'true' : undefined}
            aria-current={i === current ? 'true' : undefined}
            data-label={label ?? ''}
            className={`h-5 min-w-5 rounded-sm px-0.5 font-mono text-[10px] leading-5 ${
              label ? `${TONE[label] ?? 'bg-ink-muted'} text-ground` : 'bg-ground-sunken text-ink-muted'
            } ${i === current ? 'ring-2 ring-ink ring-offset-1 ring-offset-ground' : ''} ${low ? 'underline decoration-alarm decoration-2 underline-offset-2' : ''}`}
          >
            {n}
          </button>
        );
      })}
    </nav>
  );
});
