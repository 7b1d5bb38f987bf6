/**
 * Job kind `train-suggestions` (payload { studyId, sourceStudyIds }): reads the released decisions
 * of the source studies (lib/db/queries/suggestions.ts#trainingData), chooses and fits the model by
 * subject-wise cross-validation (lib/suggestions/cross-validate.ts), stores it as the study's next
 * model version (in use from then on) and queues `score-suggestions` for the study's ready runs, in
 * one commit. Progress stages: reading, cross-validating, storing.
 */
import { insertSuggestionModel, trainingData } from '@/lib/db/queries/suggestions';
import { trainSuggestionModel } from '@/lib/suggestions/cross-validate';
import { trainSuggestionsPayloadSchema } from '@/lib/jobs/suggestion-payloads';
import { PermanentJobError } from '@/lib/jobs/errors';
import { enqueueJob } from '@/lib/jobs/queue';
import { defineJobKind } from '../types';

export const trainSuggestionsKind = defineJobKind({
  kind: 'train-suggestions',
  payloadSchema: trainSuggestionsPayloadSchema,
  async run(ctx) {
    const { payload } = ctx;
    await ctx.progress('reading', 1);
    const data = await trainingData({ studyIds: payload.sourceStudyIds }, ctx.db);
    if (data.rows.length === 0)
      throw new PermanentJobError(
        'The selected studies have no released signal or noise decisions yet; release decisions first, then train.',
      );
    await ctx.progress('cross-validating', 5);
    let trained;
    try {
      trained = trainSuggestionModel(data.rows, { onProgress: (f) => ctx.progressSync('cross-validating', 5 + 90 * f) });
    } catch (err) {
      throw new PermanentJobError(`The model cannot be trained: ${err instanceof Error ? err.message : String(err)}`);
    }
    await ctx.progress('storing', 96);
    const stored = await ctx.commit(
      async (trx) => {
        const m = await insertSuggestionModel(trx, {
          studyId: payload.studyId,
          model: trained.model,
          report: trained.report,
          training: { studies: payload.sourceStudyIds, releases: data.releases, skipped: data.skipped },
          createdBy: ctx.job.createdBy ?? null,
        });
        await enqueueJob(trx, {
          kind: 'score-suggestions',
          payload: { studyId: payload.studyId },
          studyId: payload.studyId,
          createdBy: ctx.job.createdBy ?? null,
        });
        return m;
      },
      (m) => ({
        modelId: m.id,
        version: m.version,
        chosen: trained.report.chosen,
        accuracy: trained.report.score.percentAgreement.value,
        n: trained.report.n,
      }),
    );
    ctx.logger.info(
      `study ${payload.studyId}: suggestion model v${stored.version} (${trained.report.chosen}) from ${data.rows.length} components`,
    );
    return stored;
  },
});
