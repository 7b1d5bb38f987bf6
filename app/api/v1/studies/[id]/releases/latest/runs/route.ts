import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { authenticateBearer, readOnlyResponse } from '@/lib/auth/access-tokens';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { latestStudyRelease } from '@/lib/db/queries/releases';
import { notFound } from '@/lib/errors';

const params = z.object({ id: z.coerce.number().int().positive() });
const entity = z.string().max(64).regex(/^[A-Za-z0-9]+$/, 'a BIDS label (letters and digits)').optional();
const query = z.object({ sub: entity, ses: entity, task: entity, acq: entity, run: entity });

// GET /api/v1/studies/:id/releases/latest/runs – (Bearer token) the latest study release's runs: entities, k, noise list, file addresses
export const GET = handler({ permission: 'public', params, query, what: 'The pipeline request' }, async ({ req, params, query }) => {
  const user = await authenticateBearer(req);
  const access = await findStudyAccess({ user, studyId: params.id });
  if (!access) throw notFound('The study');
  const release = await latestStudyRelease({ studyId: params.id });
  if (!release?.manifest) throw notFound(`A release of study ${params.id}`);
  const m = release.manifest;
  const origin = new URL(req.url).origin;
  const url = (name: string) => `${origin}/api/v1/releases/${release.id}/files/${encodeURIComponent(name)}`;
  const runs = m.runs.filter(
    (r) => (!query.sub || r.entities.sub === query.sub) && (!query.ses || r.entities.ses === query.ses) && (!query.task || r.entities.task === query.task) && (!query.acq || r.entities.acq === query.acq) && (!query.run || r.entities.run === query.run),
  );
  return {
    study: m.study,
    release: { id: release.id, version: release.version, releasedAt: m.release.releasedAt, software: m.software, uncertainInExport: m.uncertainInExport },
    runs: runs.map((r) => ({
      runId: r.runId,
      name: r.stem,
      entities: r.entities,
      k: r.k,
      noise: r.noise,
      files: Object.fromEntries(m.files.filter((f) => f.runId === r.runId).map((f) => [f.name, { url: url(f.name), sha256: f.sha256, bytes: f.bytes }])),
    })),
    cautions: m.cautions,
  };
});

const refuse = handler({ permission: 'public', what: 'The pipeline request' }, async () => readOnlyResponse());
export { refuse as POST, refuse as PUT, refuse as PATCH, refuse as DELETE };
