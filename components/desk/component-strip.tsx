'use client';
import { memo, useEffect, useRef } from 'react';
import type { ShownVote } from '@/lib/desk/use-vote';

const TONE: Record<string, string> = {
  signal: 'bg-verdict-signal',
  noise: 'bg-verdict-noise',
  uncertain: 'bg-verdict-uncertain',
};

export type StripFilter = 'all' | 'unlabelled' | 'flagged';
const FILTERS: { value: StripFilter; text: string }[] = [
  { value: 'all', text: 'All' },
  { value: 'unlabelled', text: 'Unlabelled' },
  { value: 'flagged', text: 'Flagged' },
];

/** Which list positions a filter keeps (the current one always stays, so the rater never loses her place). */
export function visibleIndices(
  ids: number[],
  filter: StripFilter,
  votes: Map<number, ShownVote>,
  flags: Set<number>,
  current: number,
): number[] {
  const out: number[] = [];
  ids.forEach((id, i) => {
    if (i === current || filter === 'all' || (filter === 'unlabelled' && !votes.get(id)?.label) || (filter === 'flagged' && flags.has(id)))
      out.push(i);
  });
  return out;
}

/**
 * One compact cell per component, coloured by the rater's own label; the current one outlined, a
 * corner mark for the rater's flag, an underline for low reproducibility. Filters keep only the
 * unlabelled or flagged ones. The current cell is in the tab order; arrows and Enter work on it as
 * anywhere on the desk. `numbers` are the component numbers in list order (default 1..n).
 */
export const ComponentStrip = memo(function ComponentStrip({
  ids,
  current,
  votes,
  onPick,
  numbers,
  lowIds,
  flags,
  filter = 'all',
  onFilter,
}: {
  ids: number[];
  current: number;
  votes: Map<number, ShownVote>;
  onPick: (index: number) => void;
  numbers?: number[];
  lowIds?: Set<number>;
  flags?: Set<number>;
  filter?: StripFilter;
  onFilter?: (f: StripFilter) => void;
}) {
  const shown = visibleIndices(ids, filter, votes, flags ?? new Set(), current);
  const currentRef = useRef<HTMLButtonElement>(null);
  const navRef = useRef<HTMLElement>(null);
  // when the strip has the focus, it follows the current component
  useEffect(() => {
    if (navRef.current?.contains(document.activeElement) && document.activeElement !== currentRef.current) currentRef.current?.focus();
  }, [current]);
  return (
    <div className="flex flex-wrap items-start gap-2">
      {onFilter ? (
        <div
          role="group"
          aria-label="Show in the strip"
          className="flex shrink-0 overflow-hidden rounded border border-line-strong text-xs"
        >
          {FILTERS.map((f) => (
            <button
              key={f.value}
              type="button"
              aria-pressed={filter === f.value}
              onClick={() => onFilter(f.value)}
              data-testid={`strip-filter-${f.value}`}
              className={`px-2 py-0.5 ${filter === f.value ? 'bg-ground-raised text-ink' : 'text-ink-muted'}`}
            >
              {f.text}
            </button>
          ))}
        </div>
      ) : null}
      <nav
        ref={navRef}
        aria-label="Components"
        className="flex min-w-0 flex-1 flex-wrap gap-px"
        data-testid="component-strip"
        data-filter={filter}
      >
        {shown.map((i) => {
          const id = ids[i];
          const label = votes.get(id)?.label;
          const n = numbers?.[i] ?? i + 1;
          const low = lowIds?.has(id) ?? false;
          const flagged = flags?.has(id) ?? false;
          return (
            <button
              key={id}
              ref={i === current ? currentRef : undefined}
              type="button"
              tabIndex={i === current ? 0 : -1}
              onClick={() => onPick(i)}
              aria-label={`Component ${n}${label ? `, ${label}` : ', not labelled'}${flagged ? ', flagged' : ''}${low ? ', low reproducibility' : ''}`}
              data-low-reproducibility={low ? 'true' : undefined}
              data-flagged={flagged ? 'true' : undefined}
              data-n={n}
              aria-current={i === current ? 'true' : undefined}
              data-label={label ?? ''}
              className={`relative h-4 w-6 rounded-sm font-mono text-[9px] leading-4 ${
                label ? `${TONE[label] ?? 'bg-ink-muted'} text-ground` : 'bg-ground-sunken text-ink-muted'
              } ${i === current ? 'ring-2 ring-ink ring-offset-1 ring-offset-ground' : ''} ${low ? 'underline decoration-alarm decoration-2 underline-offset-1' : ''}`}
            >
              {n}
              {flagged ? (
                <span
                  aria-hidden
                  className="absolute right-0 top-0 h-0 w-0 border-l-[5px] border-t-[5px] border-l-transparent border-t-alarm"
                />
              ) : null}
            </button>
          );
        })}
      </nav>
    </div>
  );
});
