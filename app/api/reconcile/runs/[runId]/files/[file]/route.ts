import { handler } from '@/lib/api/handler';
import { loadRunForReconcile } from '@/lib/consensus/load-run-for-reconcile';
import { reconcileFileParams } from '@/lib/consensus/reconcile-params';
import { storedFileResponse } from '@/lib/storage/respond';
import { AppError } from '@/lib/errors';

// GET /api/reconcile/runs/:runId/files/:file – stream a run's maps or mean image to the lead reconciling it
export const GET = handler(
  { permission: 'decisions.reconcile', params: reconcileFileParams, what: 'The file' },
  async ({ user, params }) => {
    const { run, files } = await loadRunForReconcile({ user, runId: params.runId });
    const key = files[params.file];
    if (!key) throw new AppError('not_found', `Run ${params.runId} has no ${params.file}; its decomposition did not write it.`);
    return storedFileResponse(key, {
      name: params.file,
      etag: `d${run.decompositionId}-${params.file}`,
      cache: 'private-day', // the address carries the decomposition id (?d=…): a new decomposition is a new address
      missing: `The ${params.file} of run ${params.runId} is missing from storage. Ask the facility admin to check the uploads folder.`,
    });
  },
);
