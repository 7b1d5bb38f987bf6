/**
 * Job kind `recalibrate` (payload { repeat }): assigns the calibration set again to certified
 * raters whose re-calibration is due (lib/calibration/assign-recalibrations.ts). With repeat (the
 * default) it queues itself for the next day while any study has a re-calibration interval.
 */
import { assignDueRecalibrations } from '@/lib/calibration/assign-recalibrations';
import { RECALIBRATE, recalibratePayloadSchema } from '@/lib/jobs/recalibrate-payload';
import { ensureRecalibrationJob } from '@/lib/calibration/recalibration-job';
import { anyStudyRecalibrates } from '@/lib/db/queries/calibration-rounds';
import { defineJobKind } from '../types';

export const recalibrateKind = defineJobKind({
  kind: RECALIBRATE,
  payloadSchema: recalibratePayloadSchema,
  async run(ctx) {
    await ctx.progress('assigning', 1);
    const result = await assignDueRecalibrations(ctx.db);
    if (ctx.payload.repeat && (await anyStudyRecalibrates(ctx.db))) await ensureRecalibrationJob(ctx.db);
    ctx.logger.info(`re-calibration: ${result.started.length} rater(s) got the calibration set again`);
    return { started: result.started.length };
  },
});
