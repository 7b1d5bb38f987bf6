import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { readOnlyResponse } from '@/lib/auth/access-tokens';
import { latestReleasedRuns } from '@/lib/releases/latest-runs';
import { notFound } from '@/lib/errors';

const params = z.object({ id: z.coerce.number().int().positive() });
const entity = z
  .string()
  .max(64)
  .regex(/^[A-Za-z0-9]+$/, 'a BIDS label (letters and digits)')
  .optional();
const query = z.object({ sub: entity, ses: entity, task: entity, acq: entity, run: entity });

// GET /api/v1/studies/:id/releases/latest/runs – (Bearer token) per run its latest release (study or single-run): entities, k, noise list, file addresses, denoised files
export const GET = handler(
  { auth: 'token', permission: 'releases.read', scope: 'study', params, query, what: 'The pipeline request' },
  async ({ req, params, query }) => {
    const latest = await latestReleasedRuns({ studyId: params.id, filter: query, origin: new URL(req.url).origin });
    if (!latest.any || !latest.manifest) throw notFound(`A release of study ${params.id}`);
    const m = latest.manifest;
    const s = latest.studyRelease;
    return {
      study: m.study,
      // the newest study release (null when only single runs have been released); each run names its own release
      release: s?.manifest
        ? {
            id: s.id,
            version: s.version,
            releasedAt: s.manifest.release.releasedAt,
            software: s.manifest.software,
            uncertainInExport: s.manifest.uncertainInExport,
          }
        : null,
      runs: latest.runs,
      cautions: m.cautions,
    };
  },
);

const refuse = handler({ permission: 'public', what: 'The pipeline request' }, async () => readOnlyResponse());
export { refuse as POST, refuse as PUT, refuse as PATCH, refuse as DELETE };
