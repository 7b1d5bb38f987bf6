import 'server-only';
/**
 * Imports a run together with a decomposition made outside Quorum's worker by `quorum decompose`
 * (the batch path for clusters): the run file goes through the same upload checks as a browser
 * upload, the output folder is checked against the run, and in one transaction the
 * decomposition and its components are stored, the run becomes ready and raters are assigned.
 * The folder is checked before anything is registered, so a refused folder leaves nothing behind.
 */
import { AppError } from '@/lib/errors';
import { parseBidsName } from '@/lib/bids';
import { readNiftiHeaderFile } from '@/lib/nifti';
import { removeKey } from '@/lib/storage';
import { recordAudit } from '@/lib/db/queries/audit';
import { findRunStudyId } from '@/lib/db/queries/run-changes';
import { findActiveUserByEmail } from '@/lib/db/queries/users';
import { inTransaction } from '@/lib/db/transaction';
import { afterAssignmentsCreated } from '@/lib/jobs/queue-notifications';
import { assignRaters } from './assign-raters';
import { storeDecomposition } from './ingest-decomposition';
import { copyDecompositionFiles, readDecompositionDir } from './import-decomposition';
import { attachMotion, uploadRun, type RawBody } from './upload';

type Entities = { sub?: string; ses?: string; task?: string; acq?: string; run?: string };

export async function importDecomposition(opts: {
  email: string;
  studyId: number;
  file: string;
  name: string;
  open: () => RawBody;
  entities: Entities;
  dir: string;
  motion?: { name: string; open: () => RawBody; order: 'trans-first' | 'rot-first'; units: 'radians' | 'degrees' };
}) {
  const user = await findActiveUserByEmail({ email: opts.email });
  if (!user) throw new AppError('not_found', `No active account ${opts.email}; give the e-mail of a lead of the study.`);
  const fromName = parseBidsName(opts.name);
  const e = { ...fromName, ...Object.fromEntries(Object.entries(opts.entities).filter(([, v]) => v)) } as Entities & {
    runLabel?: string | null;
  };
  const sub = e.sub ?? fromName?.sub;
  if (!sub) throw new AppError('validation', `The subject is not in the file name "${opts.name}"; give --sub.`);
  // check the folder against the run file first: a refusal then registers nothing
  const imported = await readDecompositionDir(opts.dir, await readNiftiHeaderFile(opts.file));
  const run = await uploadRun({
    user,
    studyId: opts.studyId,
    query: {
      name: opts.name,
      sub,
      ses: e.ses ?? '',
      task: e.task ?? '',
      acq: e.acq ?? '',
      run: opts.entities.run ?? fromName?.runLabel ?? '',
      queue: false,
    },
    raw: opts.open(),
  });
  if (opts.motion)
    await attachMotion({
      user,
      runId: run.id,
      query: { name: opts.motion.name, order: opts.motion.order, units: opts.motion.units },
      raw: opts.motion.open(),
    });
  const studyId = Number(await findRunStudyId({ runId: run.id }));
  const files = await copyDecompositionFiles(opts.dir);
  try {
    const result = await inTransaction(async (trx) => {
      const decompositionId = await storeDecomposition(trx, {
        runId: run.id,
        parameters: imported.parameters,
        summary: imported.summary,
        files,
        components: imported.components,
      });
      const assignment = await assignRaters(trx, { runId: run.id, assignedBy: user.id });
      if (assignment.raterIds.length) await afterAssignmentsCreated(trx, { studyId: studyId });
      await recordAudit(
        {
          actorId: user.id,
          action: 'run.imported',
          targetType: 'run',
          targetId: run.id,
          studyId: studyId,
          detail: { decompositionId, components: imported.components.length, from: 'decompose output folder' },
        },
        trx,
      );
      return { runId: run.id, decompositionId, components: imported.components.length, raters: assignment.raterIds };
    });
    return result;
  } catch (err) {
    await removeKey(files.dirKey);
    throw err;
  }
}
