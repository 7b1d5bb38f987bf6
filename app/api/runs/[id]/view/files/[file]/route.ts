import { handler } from '@/lib/api/handler';
import { fileParamsSchema } from '@/lib/desk/schemas';
import { loadRunForViewing } from '@/lib/runs/load-run-for-viewing';
import { storedFileResponse } from '@/lib/storage/respond';
import { AppError } from '@/lib/errors';

// GET /api/runs/:id/view/files/:file – a run's maps or mean image for the read-only run view (the study's leads and observers)
export const GET = handler({ permission: 'runs.read', params: fileParamsSchema, what: 'The file' }, async ({ user, params }) => {
  const loaded = await loadRunForViewing({ user, runId: params.id });
  if (!loaded) throw new AppError('not_found', `Run ${params.id} is not a ready run of a study you lead or observe.`);
  const { run, files } = loaded;
  const key = files[params.file];
  if (!key) throw new AppError('not_found', `Run ${params.id} has no ${params.file}; its decomposition did not write it.`);
  return storedFileResponse(key, {
    name: params.file,
    etag: `d${run.decompositionId}-${params.file}-${key.replace(/[^a-z0-9]/gi, '').slice(-12)}`, // a new structural upload is a new key
    cache: 'private-day', // the address carries the decomposition id (?d=…): a new decomposition is a new address
    missing: `The ${params.file} of run ${params.id} is missing from storage. Ask the facility admin to check the uploads folder.`,
  });
});
