/**
 * Job kind `score-suggestions` (payload { studyId, runId? }): P(noise) of every component of the
 * study's ready runs (or one run) under the study's model in use, stored per component with the
 * model (suggestions table). Queued after training and when a decomposition becomes ready.
 * Nothing to do (no model) is a success with scored = 0. Progress stages: reading, scoring.
 */
import type { Trx } from '@/lib/db/transaction';
import { componentsToScore, insertSuggestions, studyHasSuggestionModel } from '@/lib/db/queries/suggestions';
import { findActiveModel } from '@/lib/suggestions/active-model';
import { scoreComponents } from '@/lib/suggestions/score-components';
import { scoreSuggestionsPayloadSchema } from '@/lib/jobs/suggestion-payloads';
import { enqueueJob } from '@/lib/jobs/queue';
import { defineJobKind } from '../types';

export const scoreSuggestionsKind = defineJobKind({
  kind: 'score-suggestions',
  payloadSchema: scoreSuggestionsPayloadSchema,
  async run(ctx) {
    const { payload } = ctx;
    await ctx.progress('reading', 1);
    const model = await findActiveModel({ studyId: payload.studyId }, ctx.db);
    if (!model) return { scored: 0, modelId: null };
    const rows = await componentsToScore({ studyId: payload.studyId, runId: payload.runId }, ctx.db);
    await ctx.progress('scoring', 30);
    const scored = scoreComponents(model.model, rows);
    await ctx.commit(
      (trx) => insertSuggestions(trx, model.id, scored),
      () => ({ scored: scored.length, modelId: model.id }),
    );
    ctx.logger.info(`study ${payload.studyId}: ${scored.length} components scored with suggestion model v${model.version}`);
    return { scored: scored.length, modelId: model.id };
  },
});

/** In the decompose job's commit: a new decomposition of a study with a model in use is scored. */
export async function queueScoringOfNewRun(trx: Trx, { studyId, runId }: { studyId: number; runId: number }): Promise<void> {
  if (!(await studyHasSuggestionModel({ studyId }, trx))) return;
  await enqueueJob(trx, { kind: 'score-suggestions', payload: { studyId, runId }, studyId });
}
