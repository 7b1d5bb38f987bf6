'use client';
import { memo } from 'react';
import type { ShownVote } from '@/lib/desk/use-vote';

const TONE: Record<string, string> = {
  signal: 'bg-verdict-signal',
  noise: 'bg-verdict-noise',
  uncertain: 'bg-verdict-uncertain',
};

/** One cell per component, coloured by the rater's own label; the current one outlined. */
export const ComponentStrip = memo(function ComponentStrip({
  ids,
  current,
  votes,
  onPick,
}: {
  ids: number[];
  current: number;
  votes: Map<number, ShownVote>;
  onPick: (index: number) => void;
}) {
  return (
    <nav aria-label="Components" className="flex flex-wrap gap-0.5" data-testid="component-strip">
      {ids.map((id, i) => {
        const label = votes.get(id)?.label;
        return (
          <button
            key={id}
            type="button"
            tabIndex={-1}
            onClick={() => onPick(i)}
            aria-label={`Component ${i + 1}${label ? `, ${label}` : ', not labelled'}`}
            aria-current={i === current ? 'true' : undefined}
            data-label={label ?? ''}
            className={`h-5 min-w-5 rounded-sm px-0.5 font-mono text-[10px] leading-5 ${
              label ? `${TONE[label] ?? 'bg-ink-muted'} text-ground` : 'bg-ground-sunken text-ink-muted'
            } ${i === current ? 'ring-2 ring-ink ring-offset-1 ring-offset-ground' : ''}`}
          >
            {i + 1}
          </button>
        );
      })}
    </nav>
  );
});
