import type { ExecutorStatus } from '@/lib/worker/executors/executor-status';
import { Notice } from '@/components/ui/notice';

/** Facility page: where decompose and denoise jobs run, with which settings, and whether the cluster answers. */
export function ExecutorPanel({ status }: { status: ExecutorStatus }) {
  return (
    <div className="flex flex-col gap-3" data-testid="executor-panel">
      <p className="text-sm text-ink">
        Decompose and denoise jobs run{' '}
        <strong data-testid="executor-name">
          {status.executor === 'slurm'
            ? 'on the Slurm cluster'
            : status.executor === 'local'
              ? "on the worker's own machine"
              : 'nowhere until the setting is fixed'}
        </strong>{' '}
        (QUORUM_EXECUTOR).
      </p>
      {status.problem ? (
        <Notice kind="error" testId="executor-problem">
          {status.problem} Fix the worker&apos;s environment and restart it.
        </Notice>
      ) : null}
      {status.settings.length ? (
        <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-sm">
          {status.settings.map((s) => (
            <div key={s.label} className="contents">
              <dt className="text-ink-muted">{s.label}</dt>
              <dd className="font-mono text-xs text-ink">{s.value}</dd>
            </div>
          ))}
        </dl>
      ) : null}
      {status.cluster ? (
        status.cluster.ok ? (
          <Notice kind="ok" testId="cluster-answers">
            The cluster answers:{' '}
            {status.cluster.partitions.map((p) => `partition ${p.name} ${p.state}, ${p.nodes}`).join('; ') || 'no partitions listed'}.
          </Notice>
        ) : (
          <Notice kind="error" testId="cluster-silent">
            The cluster does not answer from this server: {status.cluster.error}. Jobs wait in the queue while the worker cannot reach it.
          </Notice>
        )
      ) : null}
    </div>
  );
}
