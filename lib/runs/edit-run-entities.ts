import 'server-only';
/**
 * A lead corrects a run's BIDS entities (sub, ses, task, acq, run), e.g. after two uploads were
 * given the same ones. Refused once the run is in a release (its files and noise lists carry the
 * old names, and pipelines fetch them by those), and refused when another run of the study already
 * has the new entities. The change is audited with the old and new names.
 */
import { bidsName } from '@/lib/bids';
import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/db/queries/audit';
import { isRunReleased } from '@/lib/db/queries/desk';
import { findRunWithEntities, lockRunEntities, writeRunEntities, type RunListItem } from '@/lib/db/queries/runs';
import { listRunsForStudy } from './list-study-runs';
import { inTransaction } from '@/lib/db/transaction';
import type { UserRow } from '@/lib/db/queries/users';
import { runForChange } from './upload';
import type { RunEntities } from './schema';

export async function editRunEntities({
  user,
  runId,
  entities,
  ip = null,
}: {
  user: Pick<UserRow, 'id' | 'role'>;
  runId: number;
  entities: RunEntities;
  ip?: string | null;
}): Promise<RunListItem> {
  const run = await runForChange(user, runId);
  const next = {
    sub: entities.sub,
    ses: entities.ses || null,
    task: entities.task || null,
    acq: entities.acq || null,
    runLabel: entities.run || null,
  };
  const before = bidsName(run);
  const after = bidsName(next);
  // one transaction with the run row locked: not when the run is in a release, not when another run of the study has the entities
  await inTransaction(async (trx) => {
    const row = await lockRunEntities(trx, { runId });
    if (await isRunReleased({ runId }, trx)) {
      throw new AppError(
        'conflict',
        `${before} is already in a release, so its labels can no longer change: the released files and pipelines use this name. Upload the run again under the right labels if it must be released under them.`,
      );
    }
    const other = await findRunWithEntities({ studyId: run.studyId, entities: next, exceptRunId: runId }, trx);
    if (other) {
      throw new AppError(
        'conflict',
        `Run #${other.id} (uploaded as ${other.originalName}) already has the labels ${after}. Choose labels no other run of the study has, e.g. another run number.`,
        { run: ['These labels are taken.'] },
      );
    }
    const same =
      row.sub === next.sub && row.ses === next.ses && row.task === next.task && row.acq === next.acq && row.runLabel === next.runLabel;
    if (same) return;
    await writeRunEntities(trx, { runId, entities: next });
    await recordAudit(
      {
        actorId: user.id,
        action: 'run.relabel',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        ip,
        detail: { from: before, to: after },
      },
      trx,
    );
  });
  const [row] = await listRunsForStudy({ user, studyId: run.studyId, runId });
  return row;
}
