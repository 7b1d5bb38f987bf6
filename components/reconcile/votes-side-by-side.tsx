import type { ReconcileVote } from '@/lib/db/queries/reconcile';
import { labelName, noiseKindName } from '@/lib/vocabulary/protocol';

const TONE: Record<string, string> = { signal: 'text-verdict-signal', noise: 'text-verdict-noise', uncertain: 'text-verdict-uncertain' };

/** Each rater's vote, confidence and note, one row per rater. */
export function VotesSideBySide({ votes }: { votes: ReconcileVote[] }) {
  return (
    <table className="w-full text-sm" data-testid="reconcile-votes">
      <caption className="sr-only">The raters&apos; votes on this component</caption>
      <thead className="text-xs text-ink-faint">
        <tr>
          <th scope="col" className="text-left font-medium">
            Rater
          </th>
          <th scope="col" className="text-left font-medium">
            Vote
          </th>
          <th scope="col" className="text-right font-medium">
            Confidence
          </th>
        </tr>
      </thead>
      <tbody className="divide-y divide-line">
        {votes.map((v) => (
          <tr key={v.raterId} className="align-top">
            <td className="py-1.5 pr-2">{v.raterName}</td>
            <td className="py-1.5">
              <span className={`font-medium ${TONE[v.label] ?? ''}`}>{labelName(v.label)}</span>
              {v.noiseKind ? <span className="text-ink-muted"> · {noiseKindName(v.noiseKind)}</span> : null}
              {v.note ? <p className="mt-0.5 text-xs text-ink-muted">“{v.note}”</p> : null}
            </td>
            <td className="py-1.5 text-right font-mono text-ink-muted">{v.confidence ?? '—'}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
