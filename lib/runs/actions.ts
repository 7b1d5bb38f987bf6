import 'server-only';
/**
 * Run actions of a study's leads and admins: queue (first decomposition, or re-decompose with
 * other settings), retry a failed or cancelled run, cancel a queued or processing one, delete.
 * Each checks the caller may change the run (WHERE-scoped), locks the run row and is audited.
 */
import { bidsName } from '@/lib/bids';
import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/db/queries/audit';
import {
  cancelOpenDecomposeJobs,
  countReleasedDecisions,
  countRunVotes,
  deleteRunRow,
  lastDecomposePayload,
  latestDecomposeJob,
  listDecompositionKeys,
  lockRunStatus,
  markRunCancelled,
} from '@/lib/db/queries/run-changes';
import { findRunForUser, type RunListItem, type RunStatus } from '@/lib/db/queries/runs';
import { listRunsForStudy } from './list-study-runs';
import { inTransaction, type Trx } from '@/lib/db/transaction';
import type { UserRow } from '@/lib/db/queries/users';
import { removeKey } from '@/lib/storage';
import { notFound } from '@/lib/errors';
import type { DecompositionOptionsInput } from '@/lib/jobs';
import { decompositionOptionsFor, queueDecomposition } from './queue-job';
import { runForChange } from './upload';
import type { DecomposeSettings } from './schema';
import { deskMapsKey } from '@/lib/desk/map-store';

type Actor = Pick<UserRow, 'id' | 'role'>;

async function lockedStatus(trx: Trx, runId: number): Promise<RunStatus> {
  const status = await lockRunStatus(trx, { runId });
  if (!status) throw notFound('The run');
  return status;
}

async function rowFor(user: Actor, studyId: number, runId: number): Promise<RunListItem> {
  const [row] = await listRunsForStudy({ user, studyId, runId });
  return row;
}

/**
 * Queues a decomposition: for a run just uploaded (status uploaded), or again for a ready, failed
 * or cancelled run, optionally with other dimensionality settings (fixed N, another method).
 */
export async function queueRun({
  user,
  runId,
  settings,
}: {
  user: Actor;
  runId: number;
  settings?: DecomposeSettings;
}): Promise<RunListItem> {
  const run = await runForChange(user, runId);
  await inTransaction(async (trx) => {
    const status = await lockedStatus(trx, runId);
    if (status === 'queued' || status === 'processing') {
      throw new AppError('conflict', `The run is already ${status}. Wait for it to finish or cancel it first.`);
    }
    await queueDecomposition(trx, { runId, createdBy: user.id, options: decompositionOptionsFor(settings) });
    await recordAudit(
      {
        actorId: user.id,
        action: status === 'uploaded' ? 'run.queue' : 'run.redecompose',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        detail: { from: status, settings: settings ?? null },
      },
      trx,
    );
  });
  return rowFor(user, run.studyId, runId);
}

/** Queues a failed or cancelled run again with the settings of its last job. */
export async function retryRun({ user, runId }: { user: Actor; runId: number }): Promise<RunListItem> {
  const run = await runForChange(user, runId);
  await inTransaction(async (trx) => {
    const status = await lockedStatus(trx, runId);
    if (status !== 'failed' && status !== 'cancelled') {
      throw new AppError('conflict', `Only a failed or cancelled run can be retried; this one is ${status}.`);
    }
    const payload = (await lastDecomposePayload(trx, { runId })) as { decompositionOptions?: DecompositionOptionsInput };
    await queueDecomposition(trx, { runId, createdBy: user.id, options: payload.decompositionOptions });
    await recordAudit(
      { actorId: user.id, action: 'run.retry', targetType: 'run', targetId: runId, studyId: run.studyId, detail: { from: status } },
      trx,
    );
  });
  return rowFor(user, run.studyId, runId);
}

/** Cancels a queued or processing run: its open decompose jobs are cancelled (lib/jobs' cancelJob; a running worker stops at its next progress report). */
export async function cancelRun({ user, runId }: { user: Actor; runId: number }): Promise<RunListItem> {
  const run = await runForChange(user, runId);
  const status = run.status;
  if (status !== 'queued' && status !== 'processing') {
    throw new AppError('conflict', `Only a queued or processing run can be cancelled; this one is ${status}.`);
  }
  const jobs = await cancelOpenDecomposeJobs({ runId, message: 'Cancelled by a study lead.' });
  await markRunCancelled({ runId, message: 'Cancelled by a study lead.' });
  await recordAudit({
    actorId: user.id,
    action: 'run.cancel',
    targetType: 'run',
    targetId: runId,
    studyId: run.studyId,
    detail: { from: status, jobs },
  });
  return rowFor(user, run.studyId, runId);
}

/**
 * Deletes a run with its files, decompositions, components, votes and decisions. A run with votes
 * needs a second confirmation (`confirmVotes`); a released run cannot be deleted. Audited with
 * what was removed.
 */
export async function deleteRun({
  user,
  runId,
  confirmVotes,
}: {
  user: Actor;
  runId: number;
  confirmVotes: boolean;
}): Promise<{ deleted: number }> {
  const run = await runForChange(user, runId);
  const keys: (string | null)[] = [run.fileKey, run.maskKey, run.motionKey];
  await inTransaction(async (trx) => {
    await lockedStatus(trx, runId);
    if ((await countReleasedDecisions(trx, { runId })) > 0) {
      throw new AppError('conflict', 'This run is part of a release and cannot be deleted: releases are frozen records.');
    }
    const votes = await countRunVotes(trx, { runId });
    const voteCount = votes.votes;
    if (voteCount > 0 && !confirmVotes) {
      const message = `This run already has ${voteCount} vote${voteCount === 1 ? '' : 's'} from ${Number(votes.raters)} rater${Number(votes.raters) === 1 ? '' : 's'}. Deleting it removes them for good. Confirm a second time to delete.`;
      throw new AppError('conflict', message, { confirmVotes: [message] });
    }
    for (const d of await listDecompositionKeys(trx, { runId })) {
      keys.push(d.componentsKey, d.componentsKey && deskMapsKey(d.componentsKey), d.meanKey, d.maskKey);
    }
    await recordAudit(
      {
        actorId: user.id,
        action: 'run.delete',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        detail: { name: run.originalName, entities: bidsName(run), sha256: run.sha256, votes: voteCount, status: run.status },
      },
      trx,
    );
    await deleteRunRow(trx, { runId });
  });
  for (const key of keys) {
    await removeKey(key).catch((err) => console.error(`[run.delete] could not remove ${key}:`, err));
  }
  return { deleted: runId };
}

/** The latest decompose job of a run the user may see: stage, percent, message. */
export async function runProgress({ user, runId }: { user: Actor; runId: number }) {
  const run = await findRunForUser({ user, runId });
  if (!run) throw notFound('The run');
  return { runId, status: run.status, job: await latestDecomposeJob({ runId }) };
}
