import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { findRelease, releaseReadiness } from '@/lib/db/queries/releases';
import { listDenoiseJobs, runHasMotion } from '@/lib/db/queries/exports';
import { enqueueDenoise } from '@/lib/jobs/queue-denoise';
import { recordAudit } from '@/lib/db/queries/audit';
import { AppError, notFound } from '@/lib/errors';

const params = z.object({ id: z.coerce.number().int().positive() });
const body = z.object({
  releaseId: z.coerce.number().int().positive().optional(),
  mode: z.enum(['partial', 'full']).default('partial'),
  includeMotion: z.coerce.boolean().default(false),
});

// GET /api/runs/:id/denoise – the run's denoise requests with progress and, when done, a download address
export const GET = handler({ permission: 'releases.read', params, what: 'The denoise request list', scope: 'run' }, async ({ params }) => {
  const jobs = await listDenoiseJobs({ runIds: [params.id] });
  return {
    jobs: jobs.map((j) => ({
      jobId: j.jobId,
      status: j.status,
      stage: j.stage,
      percent: j.percent,
      message: j.message,
      mode: j.payload?.mode ?? null,
      includeMotion: j.payload?.includeMotion ?? false,
      releaseId: j.payload?.releaseId ?? null,
      createdAt: j.createdAt,
      file:
        j.status === 'succeeded' && j.result
          ? { name: j.result.name, sha256: j.result.sha256, bytes: j.result.bytes, url: `/api/runs/${params.id}/denoise/${j.jobId}` }
          : null,
    })),
  };
});

// POST /api/runs/:id/denoise – a lead asks the worker for denoised data of a released run ({releaseId, mode, includeMotion})
export const POST = handler(
  {
    permission: 'denoise.request',
    params,
    body,
    what: 'The denoise request',
    scope: 'run',
    studyRule: 'lead',
    denied: 'requesting denoised data for this study (only its leads may)',
  },
  async ({ user, access, params, body }) => {
    const run = { runId: params.id, studyId: access.studyId };
    if (body.releaseId) {
      const release = await findRelease({ releaseId: body.releaseId });
      if (!release || release.studyId !== run.studyId || !release.manifest?.runs.some((r) => r.runId === run.runId))
        throw notFound(`Run ${run.runId} in release ${body.releaseId}`);
    } else {
      const r = await releaseReadiness({ studyId: run.studyId, runId: run.runId });
      if (r.pending + r.undecided > 0 || r.runs === 0)
        throw new AppError(
          'conflict',
          `Run ${run.runId} has ${r.pending + r.undecided} components without a final decision; decide them first or denoise from a release.`,
        );
    }
    if (body.includeMotion && !(await runHasMotion({ runId: run.runId }))) {
      throw new AppError(
        'validation',
        'This run has no motion parameters, so they cannot be added as regressors; untick "motion" or attach a motion table to the run.',
        { includeMotion: ['the run has no motion parameters'] },
      );
    }
    const { jobId, existing } = await enqueueDenoise({
      payload: {
        runId: run.runId,
        ...(body.releaseId ? { releaseId: body.releaseId } : {}),
        mode: body.mode,
        includeMotion: body.includeMotion,
      },
      studyId: run.studyId,
      createdBy: user.id,
    });
    if (!existing)
      await recordAudit({
        actorId: user.id,
        action: 'denoise.request',
        targetType: 'run',
        targetId: run.runId,
        studyId: run.studyId,
        detail: { jobId, ...body },
      });
    return Response.json({ jobId, existing }, { status: existing ? 200 : 202 });
  },
);
