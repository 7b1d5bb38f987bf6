'use client';

import { useMemo, useState } from 'react';
import Link from 'next/link';
import { ViewerWarmUp } from '@/components/viewer/warm-up';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import { useQueryClient } from '@tanstack/react-query';
import type { RunListItem, RunStatus } from '@/lib/db/queries/runs';
import { bidsName } from '@/lib/bids';
import { DIM_METHOD_NAMES, DIM_METHODS, type DimSetting } from '@/lib/vocabulary/protocol';
import { WARNING_SHORT } from '@/lib/decomposition/warnings';
import { decomposeSettingsSchema } from '@/lib/runs/schema';
import { deleteJson, postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { studyRunsKey } from './use-study-runs';
import { RunLabelsForm } from './run-labels-form';

const STATUS_TEXT: Record<RunStatus, string> = {
  uploaded: 'uploaded',
  queued: 'queued',
  processing: 'processing',
  ready: 'ready',
  failed: 'failed',
  cancelled: 'cancelled',
};

const col = createColumnHelper<RunListItem>();

function ProgressCell({ run }: { run: RunListItem }) {
  if (run.status === 'failed') {
    return (
      <p className="max-w-72 text-xs text-alarm" data-testid="run-failure">
        {run.job?.message ?? run.statusMessage ?? 'The decomposition failed.'}
      </p>
    );
  }
  if (run.status === 'queued' || run.status === 'processing') {
    const pct = Math.max(0, Math.min(100, run.job?.percent ?? 0));
    return (
      <div className="flex min-w-40 flex-col gap-1">
        <p className="text-xs text-ink-muted">
          {run.job?.stage ?? run.status} · {Math.round(pct)}%
        </p>
        <div
          className="h-1.5 w-full overflow-hidden rounded bg-ground-sunken"
          role="progressbar"
          aria-label={`Decomposition of ${bidsName(run)}`}
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={Math.round(pct)}
        >
          <div className="h-full bg-lumen transition-all" style={{ width: `${pct}%` }} />
        </div>
        {run.job?.message ? (
          <p className="max-w-60 text-xs text-ink-faint" data-testid="run-job-message">
            {run.job.message}
          </p>
        ) : null}
      </div>
    );
  }
  if (run.status === 'ready') return <p className="text-xs text-ink-muted">done</p>;
  if (run.status === 'cancelled') return <p className="text-xs text-ink-faint">{run.statusMessage ?? 'cancelled'}</p>;
  return <p className="text-xs text-ink-faint">not started</p>;
}

/** A study's runs with live progress, sorting, filtering, paging and row actions for the study's leads. */
/** `readOnlyOpen`: the caller leads or observes the study, so Open goes to the read-only run view rather than the rating desk. */
export function RunsTable({
  studyId,
  runs,
  canManage,
  readOnlyOpen = false,
}: {
  studyId: number;
  runs: RunListItem[];
  canManage: boolean;
  readOnlyOpen?: boolean;
}) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const [filter, setFilter] = useState('');
  const [status, setStatus] = useState<RunStatus | ''>('');
  const data = useMemo(() => (status ? runs.filter((r) => r.status === status) : runs), [runs, status]);

  const columns = useMemo(
    () => [
      col.accessor('sub', { header: 'Subject', cell: (c) => <span className="font-mono">{c.getValue()}</span> }),
      col.accessor((r) => r.ses ?? '', { id: 'ses', header: 'Session' }),
      col.accessor((r) => r.task ?? '', { id: 'task', header: 'Task' }),
      col.accessor((r) => r.runLabel ?? '', { id: 'run', header: 'Run' }),
      col.accessor((r) => r.volumes ?? 0, { id: 'volumes', header: 'Volumes', cell: (c) => c.row.original.volumes ?? '—' }),
      col.accessor((r) => r.trSeconds ?? 0, {
        id: 'tr',
        header: 'TR (s)',
        cell: (c) => (c.row.original.trSeconds == null ? '—' : c.row.original.trSeconds.toFixed(2)),
      }),
      col.accessor('status', { header: 'Status', cell: (c) => <span data-testid="run-status">{STATUS_TEXT[c.getValue()]}</span> }),
      col.display({ id: 'progress', header: 'Progress', cell: (c) => <ProgressCell run={c.row.original} /> }),
      col.accessor((r) => r.components ?? -1, {
        id: 'components',
        header: 'Components',
        cell: (c) => (
          <span className="flex flex-col">
            <span data-testid="run-components">{c.row.original.components ?? '—'}</span>
            {c.row.original.decompositionWarnings.map((w) => (
              <span key={w.code} className="text-xs text-alarm" title={w.message} data-testid={`run-warning-${w.code}`}>
                {WARNING_SHORT[w.code] ?? w.code}
              </span>
            ))}
          </span>
        ),
      }),
      col.accessor((r) => (r.assigned ? r.submitted / r.assigned : -1), {
        id: 'raters',
        header: 'Raters done',
        cell: (c) => (c.row.original.assigned ? `${c.row.original.submitted} / ${c.row.original.assigned}` : '—'),
      }),
      col.accessor((r) => r.agreement ?? -2, {
        id: 'agreement',
        header: 'Agreement',
        cell: (c) => (c.row.original.agreement == null ? '—' : c.row.original.agreement.toFixed(2)),
      }),
      col.display({
        id: 'actions',
        header: '',
        cell: (c) => <RowActions run={c.row.original} studyId={studyId} canManage={canManage} readOnlyOpen={readOnlyOpen} />,
      }),
    ],
    [studyId, canManage, readOnlyOpen],
  );

  // eslint-disable-next-line react-hooks/incompatible-library -- TanStack Table keeps its own state; the React Compiler leaves this component alone
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: (row, _id, value: string) => {
      const r = row.original;
      return `${bidsName(r)} ${r.originalName} ${r.status}`.toLowerCase().includes(String(value).toLowerCase());
    },
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageSize: 25 } },
  });

  return (
    <div className="flex flex-col gap-3">
      {/* a decomposed run is opened from here (the desk, the run view) or from Reconcile next: the viewer's code is fetched while the browser is idle */}
      {runs.some((r) => r.status === 'ready') ? <ViewerWarmUp /> : null}
      <div className="flex flex-wrap items-end gap-3 text-sm">
        <label className="flex flex-col gap-1">
          <span className="text-xs text-ink-faint">Filter</span>
          <input
            value={filter}
            onChange={(e) => setFilter(e.target.value)}
            placeholder="sub-07, rest, failed…"
            className="rounded border border-line-strong bg-ground-sunken px-2 py-1"
            data-testid="runs-filter"
          />
        </label>
        <label className="flex flex-col gap-1">
          <span className="text-xs text-ink-faint">Status</span>
          <select
            value={status}
            onChange={(e) => setStatus(e.target.value as RunStatus | '')}
            className="rounded border border-line-strong bg-ground-sunken px-2 py-1"
          >
            <option value="">all</option>
            {Object.keys(STATUS_TEXT).map((s) => (
              <option key={s} value={s}>
                {s}
              </option>
            ))}
          </select>
        </label>
        <p className="ml-auto text-xs text-ink-faint">
          {table.getFilteredRowModel().rows.length} of {runs.length} runs
        </p>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full text-sm" data-testid="runs-table">
          <thead className="text-left text-xs text-ink-muted">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => (
                  <th
                    key={h.id}
                    className="whitespace-nowrap px-2 py-1"
                    aria-sort={
                      h.column.getIsSorted() === 'asc' ? 'ascending' : h.column.getIsSorted() === 'desc' ? 'descending' : undefined
                    }
                  >
                    {h.column.getCanSort() ? (
                      <button type="button" onClick={h.column.getToggleSortingHandler()} className="hover:text-ink">
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        {h.column.getIsSorted() === 'asc' ? ' ▲' : h.column.getIsSorted() === 'desc' ? ' ▼' : ''}
                      </button>
                    ) : (
                      flexRender(h.column.columnDef.header, h.getContext())
                    )}
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody className="divide-y divide-line">
            {table.getRowModel().rows.map((row) => (
              <tr
                key={row.id}
                data-testid="run-row"
                data-run={bidsName(row.original)}
                data-status={row.original.status}
                className="align-top"
              >
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-2 py-1.5">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {table.getRowModel().rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-2 py-4 text-ink-muted">
                  {runs.length ? 'No run matches the filter.' : 'No runs yet.'}
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
      {table.getPageCount() > 1 ? (
        <div className="flex items-center gap-2 text-sm">
          <Button variant="quiet" type="button" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous
          </Button>
          <span className="text-ink-muted">
            Page {table.getState().pagination.pageIndex + 1} of {table.getPageCount()}
          </span>
          <Button variant="quiet" type="button" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next
          </Button>
        </div>
      ) : null}
    </div>
  );
}

type Mode = null | 'delete' | 'delete-votes' | 'redecompose' | 'labels';

function RowActions({
  run,
  studyId,
  canManage,
  readOnlyOpen,
}: {
  run: RunListItem;
  studyId: number;
  canManage: boolean;
  readOnlyOpen: boolean;
}) {
  const client = useQueryClient();
  const [mode, setMode] = useState<Mode>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  const [dim, setDim] = useState<DimSetting>('fixed');
  const [n, setN] = useState('20');
  const [fraction, setFraction] = useState('0.9');
  const name = bidsName(run);

  const act = async (call: () => Promise<{ ok: boolean; status?: number; message?: string; fields?: Record<string, string[]> }>) => {
    setPending(true);
    setMessage(null);
    const r = await call();
    setPending(false);
    if (!r.ok) {
      if (r.status === 409 && r.fields?.confirmVotes) {
        setMode('delete-votes');
        setMessage(r.message ?? null);
      } else {
        setMessage(r.message ?? 'The action failed.');
      }
      return;
    }
    setMode(null);
    await client.invalidateQueries({ queryKey: studyRunsKey(studyId) });
  };
  const del = (confirmVotes: boolean) => act(() => deleteJson(`/api/runs/${run.id}${confirmVotes ? '?confirmVotes=true' : ''}`));

  const redecompose = () => {
    const settings = {
      dimMethod: dim,
      fixedComponents: dim === 'fixed' ? Number(n) : null,
      varianceFraction: dim === 'variance' ? Number(fraction) : null,
    };
    const parsed = decomposeSettingsSchema.safeParse(settings);
    if (!parsed.success) {
      setMessage(parsed.error.issues[0].message);
      return;
    }
    return act(() => postJson(`/api/runs/${run.id}/queue`, parsed.data));
  };

  const ready = run.status === 'ready';
  return (
    <div className="flex min-w-40 flex-col items-end gap-1">
      <div className="flex flex-wrap justify-end gap-1">
        {ready ? (
          <Link
            href={readOnlyOpen ? `/runs/${run.id}/view` : `/runs/${run.id}/rate`}
            className="rounded px-2 py-1 text-xs text-lumen hover:bg-ground-raised"
            data-testid="run-open"
          >
            Open
          </Link>
        ) : null}
        {canManage && run.status === 'uploaded' ? (
          <Button variant="quiet" type="button" disabled={pending} onClick={() => act(() => postJson(`/api/runs/${run.id}/queue`, {}))}>
            Start
          </Button>
        ) : null}
        {canManage && (run.status === 'failed' || run.status === 'cancelled') ? (
          <Button
            variant="quiet"
            type="button"
            disabled={pending}
            onClick={() => act(() => postJson(`/api/runs/${run.id}/retry`, {}))}
            aria-label={`Retry ${name}`}
          >
            Retry
          </Button>
        ) : null}
        {canManage && (run.status === 'queued' || run.status === 'processing') ? (
          <Button
            variant="quiet"
            type="button"
            disabled={pending}
            onClick={() => act(() => postJson(`/api/runs/${run.id}/cancel`, {}))}
            aria-label={`Cancel ${name}`}
          >
            Cancel
          </Button>
        ) : null}
        {canManage && (ready || run.status === 'failed' || run.status === 'cancelled') ? (
          <Button variant="quiet" type="button" onClick={() => setMode(mode === 'redecompose' ? null : 'redecompose')}>
            Re-decompose…
          </Button>
        ) : null}
        {canManage ? (
          <Button
            variant="quiet"
            type="button"
            onClick={() => setMode(mode === 'labels' ? null : 'labels')}
            aria-label={`Edit the labels of ${name}`}
            data-testid="run-labels"
          >
            Labels…
          </Button>
        ) : null}
        {canManage ? (
          <Button variant="danger" type="button" onClick={() => setMode('delete')} aria-label={`Delete ${name}`} data-testid="run-delete">
            Delete
          </Button>
        ) : null}
      </div>
      {mode === 'delete' ? (
        <div className="flex items-center gap-2 text-xs">
          <span>Delete {name}?</span>
          <Button variant="danger" type="button" disabled={pending} onClick={() => del(false)} data-testid="run-delete-confirm">
            Delete
          </Button>
          <Button variant="quiet" type="button" onClick={() => setMode(null)}>
            Keep
          </Button>
        </div>
      ) : null}
      {mode === 'delete-votes' ? (
        <div className="flex flex-col items-end gap-1 text-xs">
          <Button variant="danger" type="button" disabled={pending} onClick={() => del(true)} data-testid="run-delete-votes">
            Delete the run and its votes
          </Button>
          <Button
            variant="quiet"
            type="button"
            onClick={() => {
              setMode(null);
              setMessage(null);
            }}
          >
            Keep
          </Button>
        </div>
      ) : null}
      {mode === 'labels' ? <RunLabelsForm run={run} studyId={studyId} onDone={() => setMode(null)} /> : null}
      {mode === 'redecompose' ? (
        <div className="flex flex-wrap items-center justify-end gap-1 text-xs">
          <select
            aria-label="Dimensionality"
            value={dim}
            onChange={(e) => setDim(e.target.value as DimSetting)}
            className="rounded border border-line-strong bg-ground-sunken px-1"
          >
            {DIM_METHODS.map((m) => (
              <option key={m} value={m}>
                {DIM_METHOD_NAMES[m]}
              </option>
            ))}
          </select>
          {dim === 'fixed' ? (
            <input
              aria-label="Components"
              type="number"
              min={2}
              value={n}
              onChange={(e) => setN(e.target.value)}
              className="w-16 rounded border border-line-strong bg-ground-sunken px-1"
            />
          ) : null}
          {dim === 'variance' ? (
            <input
              aria-label="Variance fraction"
              type="number"
              step="0.01"
              value={fraction}
              onChange={(e) => setFraction(e.target.value)}
              className="w-16 rounded border border-line-strong bg-ground-sunken px-1"
            />
          ) : null}
          <Button type="button" disabled={pending} onClick={redecompose}>
            Queue
          </Button>
        </div>
      ) : null}
      {message ? <Notice kind="error">{message}</Notice> : null}
    </div>
  );
}
