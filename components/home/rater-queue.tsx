import Link from 'next/link';
import type { QueueItem } from '@/lib/db/queries/work-queue';
import type { RaterGateNotice } from '@/lib/db/queries/calibration-gate';
import { Notice } from '@/components/ui/notice';
import { Panel } from '@/components/ui/panel';
import { bidsName } from '@/lib/bids';
import { ViewerWarmUp } from '@/components/viewer/warm-up';

function RunRow({ item }: { item: QueueItem }) {
  const pct = item.total ? Math.round((100 * item.labelled) / item.total) : 0;
  return (
    <li className="flex items-center gap-4 py-2" data-testid="queue-item">
      <div className="min-w-0 flex-1">
        <p className="truncate font-mono text-sm">{bidsName(item)}</p>
        <p className="text-xs text-ink-muted">
          {item.studyName}
          {item.isCalibration ? (
            <span className="ml-2 rounded border border-line-strong px-1 text-[11px] text-ink" data-testid="queue-calibration">
              calibration
            </span>
          ) : null}
        </p>
      </div>
      <div className="w-40">
        <div className="h-1.5 rounded bg-ground-sunken" aria-hidden>
          <div className="h-1.5 rounded bg-lumen" style={{ width: `${pct}%` }} />
        </div>
        <p className="mt-1 text-xs text-ink-muted">
          {item.labelled} / {item.total} labelled
        </p>
      </div>
      <p className="w-28 text-xs text-ink-muted">{item.dueAt ? `due ${item.dueAt.toISOString().slice(0, 10)}` : 'no due date'}</p>
      <Link href={`/runs/${item.runId}/rate`} className="rounded bg-lumen px-3 py-1 text-sm font-medium text-ground hover:bg-lumen-strong">
        {item.labelled > 0 ? 'Continue' : 'Start'}
      </Link>
    </li>
  );
}

export function RaterQueue({ items, held = [] }: { items: QueueItem[]; held?: RaterGateNotice[] }) {
  const open = items.filter((i) => !i.submittedAt);
  const done = items.filter((i) => i.submittedAt);
  return (
    <div className="flex flex-col gap-6">
      {held.map((h) => (
        <Notice key={h.studyId} testId="calibration-gate-notice">
          {h.studyName}: no live runs for you yet: {h.reason.replace(/^has not /, 'you have not ')} (the study&apos;s calibration
          threshold). Rate the calibration runs in your queue; your result after each one shows where you differ from the reference.
        </Notice>
      ))}
      {/* the desk is usually opened from here next: its viewer code is fetched while the browser is idle */}
      {items.length ? <ViewerWarmUp /> : null}
      <Panel title="My queue">
        {open.length === 0 ? (
          <p className="text-sm text-ink-muted" data-testid="queue-empty">
            Nothing is waiting for you. New runs appear here when a study lead assigns them.
          </p>
        ) : (
          <ul className="divide-y divide-line">
            {open.map((i) => (
              <RunRow key={i.runId} item={i} />
            ))}
          </ul>
        )}
      </Panel>
      {done.length ? (
        <Panel title="Submitted">
          <ul className="divide-y divide-line text-sm">
            {done.map((i) => (
              <li key={i.runId} className="flex items-center justify-between gap-4 py-2" data-testid="submitted-item">
                <div className="min-w-0">
                  <p className="truncate font-mono">{bidsName(i)}</p>
                  <p className="text-xs text-ink-muted">{i.studyName}</p>
                </div>
                {i.isCalibration ? (
                  <Link
                    href={`/studies/${i.studyId}/calibration/result/${i.runId}`}
                    className="text-xs text-lumen hover:text-lumen-strong"
                    data-testid="calibration-result-link"
                  >
                    Your calibration result
                  </Link>
                ) : null}
                <span className="ml-auto text-xs text-ink-muted">
                  submitted {i.submittedAt?.toISOString().replace('T', ' ').slice(0, 16)} UTC
                </span>
                {/* the desk shows a submitted run with the rater's votes, frozen unless a lead reopens it for them */}
                <Link
                  href={`/runs/${i.runId}/rate`}
                  className="rounded border border-line-strong px-3 py-1 text-xs text-ink hover:bg-ground-raised"
                  data-testid="submitted-open"
                >
                  Open
                </Link>
              </li>
            ))}
          </ul>
        </Panel>
      ) : null}
    </div>
  );
}
