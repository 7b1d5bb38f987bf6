import { labelName, noiseKindName } from '@/lib/vocabulary/protocol';
import type { OtherVote } from '@/lib/desk/types';

/** How the other raters voted on this component — only ever rendered after submission. */
export function OthersVotes({ votes, title = 'Other raters' }: { votes: OtherVote[]; title?: string }) {
  return (
    <section aria-labelledby="others-heading" className="rounded border border-line bg-ground-raised p-3" data-testid="others-votes">
      <h2 id="others-heading" className="mb-1 text-xs font-semibold uppercase tracking-wider text-ink-muted">
        {title}
      </h2>
      {votes.length === 0 ? (
        <p className="text-xs text-ink-muted">No vote on this component yet.</p>
      ) : (
        <ul className="space-y-1 text-xs">
          {votes.map((v) => (
            <li key={v.raterName} className="flex justify-between gap-2">
              <span className="text-ink-muted">{v.raterName}</span>
              <span className="text-ink">
                {labelName(v.label)}
                {v.noiseKind ? ` · ${noiseKindName(v.noiseKind)}` : ''}
                {v.confidence ? ` · ${v.confidence}/5` : ''}
              </span>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
