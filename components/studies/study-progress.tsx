import type { StudyProgress } from '@/lib/db/queries/runs';

const ORDER = ['uploaded', 'queued', 'processing', 'ready', 'failed', 'cancelled'] as const;
const NAMES: Record<(typeof ORDER)[number], string> = {
  uploaded: 'Uploaded',
  queued: 'Queued',
  processing: 'Processing',
  ready: 'Ready',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

/** The study at a glance: runs by status, components decided, open disagreements. */
export function StudyProgressSummary({ progress }: { progress: StudyProgress }) {
  return (
    <dl className="grid grid-cols-2 gap-3 text-sm sm:grid-cols-4 lg:grid-cols-8" data-testid="study-progress">
      {ORDER.map((s) => (
        <div key={s} className="rounded border border-line px-3 py-2">
          <dt className="text-xs text-ink-faint">{NAMES[s]}</dt>
          <dd className="text-lg font-semibold" data-testid={`progress-${s}`}>
            {progress.runsByStatus[s]}
          </dd>
        </div>
      ))}
      <div className="rounded border border-line px-3 py-2">
        <dt className="text-xs text-ink-faint">Components decided</dt>
        <dd className="text-lg font-semibold">
          {progress.componentsRated === null ? '—' : `${progress.componentsRated} / ${progress.components}`}
        </dd>
      </div>
      <div className="rounded border border-line px-3 py-2">
        <dt className="text-xs text-ink-faint">Open disagreements</dt>
        <dd className="text-lg font-semibold" data-testid="progress-disagreements">
          {progress.openDisagreements ?? '—'}
        </dd>
      </div>
    </dl>
  );
}
