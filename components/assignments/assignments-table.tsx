'use client';

import { useState } from 'react';
import Link from 'next/link';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import {
  callAssignments,
  useAssignmentChange,
  useStudyAssignments,
  type AssignmentCell,
  type AssignmentRow,
  type RaterOption,
  type StudyAssignments,
} from './use-study-assignments';
import { dayOf, removalText } from './format';

type Pending = { kind: 'remove' | 'replace' | 'reopen'; run: AssignmentRow; cell: AssignmentCell; to?: RaterOption };

const input = 'rounded border border-line-strong bg-ground-sunken px-2 py-1 text-xs text-ink';

/** One assigned rater in a run's row: progress, due date, and the lead's actions. */
function RaterCell({
  run,
  cell,
  raters,
  onAsk,
  onDue,
  busy,
}: {
  run: AssignmentRow;
  cell: AssignmentCell;
  raters: RaterOption[];
  onAsk: (p: Pending) => void;
  onDue: (due: string) => void;
  busy: boolean;
}) {
  const others = raters.filter((r) => !run.assignments.some((a) => a.raterId === r.id));
  const state = cell.submittedAt ? 'submitted' : cell.overdue ? 'overdue' : cell.labelled ? 'in progress' : 'not started';
  return (
    <li
      className="flex flex-wrap items-center gap-2 rounded border border-line px-2 py-1"
      data-testid={`assignment-${run.runId}-${cell.raterId}`}
    >
      <span className="font-medium" data-testid="assignment-rater">
        {cell.raterName}
      </span>
      <span className="text-xs tabular-nums text-ink-muted" data-testid="assignment-progress">
        {cell.labelled}/{run.total} labelled
      </span>
      <span
        className={`text-xs ${cell.submittedAt ? 'text-lumen-strong' : cell.overdue ? 'text-alarm' : 'text-ink-faint'}`}
        data-testid="assignment-state"
      >
        {state}
      </span>
      {cell.reopenCount ? (
        <span className="text-xs text-ink-muted" data-testid="assignment-reopened">
          reopened {cell.reopenCount === 1 ? 'once' : `${cell.reopenCount} times`}
        </span>
      ) : null}
      {cell.submittedAt ? (
        <button
          type="button"
          className="text-xs text-lumen hover:underline disabled:opacity-50"
          disabled={busy}
          onClick={() => onAsk({ kind: 'reopen', run, cell })}
          data-testid="assignment-reopen"
          title="Let the rater change their submitted votes (audited; agreement keeps the votes as first submitted)"
        >
          reopen
        </button>
      ) : null}
      {cell.notifiedAt ? null : (
        <span className="text-xs text-ink-faint" title="The e-mail listing this run goes out with the next batch">
          e-mail pending
        </span>
      )}
      <label className="flex items-center gap-1 text-xs text-ink-muted">
        due
        <input
          type="date"
          className={input}
          defaultValue={dayOf(cell.dueAt)}
          disabled={busy || !!cell.submittedAt}
          aria-label={`Due date for ${cell.raterName}`}
          onChange={(e) => onDue(e.target.value)}
        />
      </label>
      {others.length && !cell.submittedAt ? (
        <select
          className={input}
          aria-label={`Hand ${cell.raterName}'s place to`}
          value=""
          disabled={busy}
          onChange={(e) => {
            const to = raters.find((r) => r.id === Number(e.target.value));
            if (to) onAsk({ kind: 'replace', run, cell, to });
          }}
        >
          <option value="">hand over to…</option>
          {others.map((r) => (
            <option key={r.id} value={r.id}>
              {r.name} ({r.open} open)
            </option>
          ))}
        </select>
      ) : null}
      <button
        type="button"
        className="text-xs text-alarm hover:underline disabled:opacity-50"
        disabled={busy}
        onClick={() => onAsk({ kind: 'remove', run, cell })}
        data-testid="assignment-remove"
      >
        remove
      </button>
    </li>
  );
}

/** The lead's runs × raters table: progress per rater, add / remove / hand over, due dates per rater, per run or for many runs. */
export function AssignmentsTable({ studyId, initial }: { studyId: number; initial: StudyAssignments }) {
  const { data, error } = useStudyAssignments(studyId, initial);
  const [message, setMessage] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [confirm, setConfirm] = useState<Pending | null>(null);
  const [selected, setSelected] = useState<Set<number>>(new Set());
  const [bulkDue, setBulkDue] = useState('');
  const [adding, setAdding] = useState<Record<number, string>>({});
  const [reason, setReason] = useState('');

  const report = (text: string) => setMessage({ kind: 'ok', text });
  const fail = (e: unknown) => setMessage({ kind: 'error', text: (e as Error).message });

  const change = useAssignmentChange(studyId, async (op: () => Promise<string>) => report(await op()));
  const run = (op: () => Promise<string>) => change.mutate(op, { onError: fail });
  const busy = change.isPending;

  const remove = (p: Pending, confirmed: boolean) =>
    run(async () => {
      await callAssignments('DELETE', `/api/runs/${p.run.runId}/assignments/${p.cell.raterId}${confirmed ? '?confirm=1' : ''}`);
      return `${p.cell.raterName} no longer rates ${p.run.runName}.`;
    });
  const replace = (p: Pending, confirmed: boolean) =>
    run(async () => {
      await callAssignments('PATCH', `/api/runs/${p.run.runId}/assignments/${p.cell.raterId}`, {
        replaceWith: p.to!.id,
        confirm: confirmed,
      });
      return `${p.to!.name} now rates ${p.run.runName} instead of ${p.cell.raterName}; they get an e-mail with the next batch.`;
    });
  const reopen = (p: Pending, why: string) =>
    run(async () => {
      await callAssignments('POST', `/api/runs/${p.run.runId}/assignments/${p.cell.raterId}/reopen`, { reason: why });
      setReason('');
      return `${p.run.runName} is open again for ${p.cell.raterName}: they may change their votes and submit again. Agreement keeps the votes as first submitted.`;
    });
  const ask = (p: Pending) => {
    setMessage(null);
    if (p.kind === 'reopen') setConfirm(p);
    else if (p.cell.labelled > 0) setConfirm(p);
    else if (p.kind === 'remove') remove(p, false);
    else replace(p, false);
  };

  const runs = data.runs;
  const allSelected = runs.length > 0 && runs.every((r) => selected.has(r.runId));
  return (
    <div className="flex flex-col gap-4">
      {error ? <Notice kind="error">The assignments could not be refreshed: {error.message}</Notice> : null}
      {message ? (
        <Notice kind={message.kind} testId="assignments-message">
          {message.text}
        </Notice>
      ) : null}
      {confirm?.kind === 'reopen' ? (
        <form
          role="alertdialog"
          aria-labelledby="reopen-title"
          className="rounded border border-line-strong bg-ground-sunken p-3 text-sm"
          data-testid="reopen-confirm"
          onSubmit={(e) => {
            e.preventDefault();
            const p = confirm;
            setConfirm(null);
            reopen(p, reason);
          }}
        >
          <p id="reopen-title" className="font-semibold">
            Reopen {confirm.run.runName} for {confirm.cell.raterName}?
          </p>
          <p className="mt-1 text-ink-muted">
            {confirm.cell.raterName} may then change their submitted votes and must submit again. Their votes as first submitted stay in the
            history and are the ones agreement statistics use; the methods paragraph reports the reopening. The reason is recorded in the
            audit log.
          </p>
          <label className="mt-2 flex flex-col gap-1 text-ink-muted">
            Reason
            <input
              className={input}
              value={reason}
              maxLength={500}
              onChange={(e) => setReason(e.target.value)}
              data-testid="reopen-reason"
              placeholder="e.g. labelled component 12 by mistake"
            />
          </label>
          <div className="mt-2 flex gap-2">
            <Button type="submit" disabled={busy || reason.trim().length < 3} data-testid="reopen-confirm-yes">
              Reopen for {confirm.cell.raterName}
            </Button>
            <Button type="button" variant="quiet" onClick={() => setConfirm(null)}>
              Keep it submitted
            </Button>
          </div>
        </form>
      ) : confirm ? (
        <div
          role="alertdialog"
          aria-labelledby="confirm-title"
          className="rounded border border-alarm/60 bg-alarm/10 p-3 text-sm"
          data-testid="assignment-confirm"
        >
          <p id="confirm-title" className="font-semibold">
            {confirm.kind === 'remove'
              ? `Remove ${confirm.cell.raterName} from ${confirm.run.runName}?`
              : `Hand ${confirm.cell.raterName}'s place on ${confirm.run.runName} to ${confirm.to!.name}?`}
          </p>
          <p className="mt-1 text-ink-muted">
            {removalText(confirm.cell.raterName, confirm.cell.labelled)} The change is recorded in the audit log.
          </p>
          <div className="mt-2 flex gap-2">
            <Button
              variant="danger"
              disabled={busy}
              data-testid="assignment-confirm-yes"
              onClick={() => {
                const p = confirm;
                setConfirm(null);
                if (p.kind === 'remove') remove(p, true);
                else replace(p, true);
              }}
            >
              {confirm.kind === 'remove' ? 'Remove anyway' : 'Hand over anyway'}
            </Button>
            <Button variant="quiet" onClick={() => setConfirm(null)}>
              Keep
            </Button>
          </div>
        </div>
      ) : null}

      <form
        className="flex flex-wrap items-end gap-2 text-sm"
        onSubmit={(e) => {
          e.preventDefault();
          const runIds = [...selected];
          run(async () => {
            const r = await callAssignments<{ changed: number }>('PATCH', `/api/studies/${studyId}/assignments`, {
              runIds,
              dueAt: bulkDue || null,
            });
            return `${bulkDue ? `Due ${bulkDue}` : 'Due date cleared'} for ${r.changed} open assignment${r.changed === 1 ? '' : 's'} on ${runIds.length} run${runIds.length === 1 ? '' : 's'}.`;
          });
        }}
      >
        <label className="flex flex-col gap-1 text-ink-muted">
          Due date for the selected runs (open assignments)
          <input type="date" className={input} value={bulkDue} onChange={(e) => setBulkDue(e.target.value)} data-testid="bulk-due" />
        </label>
        <Button type="submit" variant="quiet" disabled={busy || selected.size === 0} data-testid="bulk-due-apply">
          {bulkDue ? 'Set due date' : 'Clear due date'} for {selected.size} run{selected.size === 1 ? '' : 's'}
        </Button>
      </form>

      <div className="overflow-x-auto">
        <table className="w-full text-sm" data-testid="assignments-table">
          <thead className="text-left text-xs text-ink-muted">
            <tr>
              <th className="px-2 py-1">
                <input
                  type="checkbox"
                  aria-label="Select every run"
                  checked={allSelected}
                  onChange={() => setSelected(allSelected ? new Set() : new Set(runs.map((r) => r.runId)))}
                />
              </th>
              <th className="px-2 py-1">Run</th>
              <th className="px-2 py-1">Components</th>
              <th className="px-2 py-1">Raters: labelled/total, state, due date</th>
              <th className="px-2 py-1">Add a rater</th>
            </tr>
          </thead>
          <tbody>
            {runs.map((r) => {
              const free = data.raters.filter((x) => !r.assignments.some((a) => a.raterId === x.id));
              const submitted = r.assignments.filter((a) => a.submittedAt).length;
              return (
                <tr key={r.runId} className="border-t border-line align-top" data-testid={`assignments-run-${r.runId}`}>
                  <td className="px-2 py-1.5">
                    <input
                      type="checkbox"
                      aria-label={`Select ${r.runName}`}
                      checked={selected.has(r.runId)}
                      onChange={() =>
                        setSelected((s) => {
                          const n = new Set(s);
                          if (n.has(r.runId)) n.delete(r.runId);
                          else n.add(r.runId);
                          return n;
                        })
                      }
                    />
                  </td>
                  <td className="px-2 py-1.5">
                    <div className="font-mono text-xs">{r.runName}</div>
                    <div className="text-xs text-ink-faint">
                      {r.status}
                      {r.assignments.length ? ` · ${submitted}/${r.assignments.length} submitted` : ''}
                    </div>
                  </td>
                  <td className="px-2 py-1.5 text-xs tabular-nums text-ink-muted">
                    {r.total ? (
                      <>
                        {r.total}
                        {r.pending && submitted === r.assignments.length && r.assignments.length ? (
                          <>
                            {' '}
                            ·{' '}
                            <Link className="text-lumen hover:underline" href={`/studies/${studyId}/reconcile`}>
                              {r.pending} to reconcile
                            </Link>
                          </>
                        ) : null}
                      </>
                    ) : (
                      '—'
                    )}
                  </td>
                  <td className="px-2 py-1.5">
                    {r.assignments.length ? (
                      <ul className="flex flex-col gap-1">
                        {r.assignments.map((a) => (
                          <RaterCell
                            key={a.raterId}
                            run={r}
                            cell={a}
                            raters={data.raters}
                            busy={busy}
                            onAsk={ask}
                            onDue={(due) =>
                              run(async () => {
                                await callAssignments('PATCH', `/api/runs/${r.runId}/assignments/${a.raterId}`, { dueAt: due || null });
                                return `${a.raterName}: ${due ? `due ${due}` : 'no due date'} on ${r.runName}.`;
                              })
                            }
                          />
                        ))}
                      </ul>
                    ) : (
                      <span className="text-xs text-ink-faint">
                        {r.status === 'ready' ? 'nobody assigned' : 'assigned when the run is ready'}
                      </span>
                    )}
                  </td>
                  <td className="px-2 py-1.5">
                    {r.status === 'ready' && free.length ? (
                      <form
                        className="flex gap-1"
                        onSubmit={(e) => {
                          e.preventDefault();
                          const raterId = Number(adding[r.runId]);
                          const rater = free.find((x) => x.id === raterId);
                          if (!rater) return;
                          run(async () => {
                            const res = await callAssignments<{ pendingBefore: number; pendingAfter: number }>(
                              'POST',
                              `/api/runs/${r.runId}/assignments`,
                              { raterId },
                            );
                            setAdding((m) => ({ ...m, [r.runId]: '' }));
                            const redo =
                              res.pendingAfter > res.pendingBefore
                                ? ` The decisions were recomputed: ${res.pendingAfter} now wait for the new votes.`
                                : '';
                            return `${rater.name} now rates ${r.runName} (e-mail with the next batch).${redo}`;
                          });
                        }}
                      >
                        <select
                          className={input}
                          aria-label={`Rater to add to ${r.runName}`}
                          value={adding[r.runId] ?? ''}
                          onChange={(e) => setAdding((m) => ({ ...m, [r.runId]: e.target.value }))}
                          data-testid="add-rater-select"
                        >
                          <option value="">choose…</option>
                          {free.map((x) => (
                            <option key={x.id} value={x.id}>
                              {x.name} ({x.open} open{x.certified === false ? ', not certified' : ''})
                            </option>
                          ))}
                        </select>
                        <Button type="submit" variant="quiet" disabled={busy || !adding[r.runId]} data-testid="add-rater">
                          Add
                        </Button>
                      </form>
                    ) : null}
                  </td>
                </tr>
              );
            })}
            {runs.length === 0 ? (
              <tr>
                <td colSpan={5} className="px-2 py-4 text-ink-muted">
                  No runs yet.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}
