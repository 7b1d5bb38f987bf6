/**
 * Job kind `release` (payload { studyId, runId, notes, ip }; the requesting lead is the job's
 * created_by): builds the release a lead asked for (lib/releases/create-release.ts buildRelease).
 * Progress stages: checking, checksums, statistics, writing. The release row, its frozen decisions,
 * manifest, stored agreement report and audit entry are written in the transaction that completes
 * the job, so a lost lease or a retry never makes two releases. A scope that can no longer be
 * released (a decision reopened meanwhile) fails at once with the reason.
 */
import { AppError } from '@/lib/errors';
import { buildRelease } from '@/lib/releases/create-release';
import { releasePayloadSchema, type ReleaseJobResult } from '@/lib/jobs/release-payload';
import { PermanentJobError } from '@/lib/jobs/errors';
import { defineJobKind } from '../types';

export const releaseKind = defineJobKind({
  kind: 'release',
  payloadSchema: releasePayloadSchema,
  async run(ctx) {
    if (ctx.job.createdBy == null)
      throw new PermanentJobError('The release job does not say which lead asked for it; ask again from the releases page.');
    try {
      const created = await buildRelease(
        { ...ctx.payload, actorId: ctx.job.createdBy },
        {
          progress: (stage, percent) => ctx.progress(stage, percent),
          commit: (write) =>
            ctx.commit(write, (v): ReleaseJobResult => ({ releaseId: v.releaseId, version: v.version, files: v.manifest.files.length })),
        },
      );
      ctx.logger.info(
        `study ${ctx.payload.studyId}: released version ${created.version} (release ${created.releaseId}, ${created.manifest.files.length} files)`,
      );
      return created;
    } catch (err) {
      if (err instanceof AppError) throw new PermanentJobError(err.message, { cause: err });
      throw err;
    }
  },
});
