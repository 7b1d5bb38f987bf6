// No `server-only` here: the worker's suggestion jobs (lib/worker/kinds/*-suggestions.ts) use these queries outside Next.js.
import type { Knex } from 'knex';
import { db, parseJson, toJson } from '@/lib/db/knex';
import type { RaterSuggestion, TrainingRecord, TrainingSource } from '@/lib/vocabulary/suggestions';

/** A component's stored features plus its variance explained, by feature key (null: undefined for it). */
type FeatureValues = Record<string, number | null>;

/** One stored model of a study; `model` and `report` are the JSON documents lib/suggestions wrote (typed there: StoredModel). */
export type StoredModelRow = {
  id: number;
  studyId: number;
  version: number;
  model: unknown;
  report: unknown;
  training: TrainingRecord;
  createdAt: string;
};

export type TrainingData = {
  rows: { subject: string; features: FeatureValues; label: 'signal' | 'noise' }[];
  releases: TrainingSource[];
  /** Released decisions left out because their label is neither signal nor noise (e.g. uncertain). */
  skipped: number;
};

function rawFeatures(json: unknown, varianceExplained: unknown): FeatureValues {
  const f = parseJson<Record<string, number | null>>(json, {}) ?? {};
  return { ...f, varianceExplained: varianceExplained == null ? null : Number(varianceExplained) };
}

/**
 * Released decisions of the studies as training rows: for each run, the decisions of the newest
 * release that contains it (study-wide or per run). Subjects are `<study id>:<sub>` (the same
 * `sub` in two studies is not assumed to be the same person).
 */
export async function trainingData({ studyIds }: { studyIds: number[] }, trx: Knex | Knex.Transaction = db): Promise<TrainingData> {
  const rows = await trx('release_decisions as rd')
    .join('releases as rl', 'rl.id', 'rd.release_id')
    .join('components as c', 'c.id', 'rd.component_id')
    .join('runs as r', 'r.id', 'rd.run_id')
    .whereIn('rl.study_id', studyIds)
    .orderBy([{ column: 'rl.id', order: 'desc' }, { column: 'rd.run_id' }, { column: 'rd.idx' }])
    .select(
      'rl.id as releaseId',
      'rl.study_id as studyId',
      'rl.run_id as releaseRunId',
      'rl.version',
      'rd.run_id as runId',
      'rd.label',
      'r.sub',
      'c.features',
      'c.variance_explained as varianceExplained',
    );
  const releaseOfRun = new Map<number, number>();
  const used = new Map<number, TrainingSource>();
  const out: TrainingData['rows'] = [];
  let skipped = 0;
  for (const r of rows) {
    const runId = Number(r.runId);
    const releaseId = Number(r.releaseId);
    if (!releaseOfRun.has(runId)) releaseOfRun.set(runId, releaseId);
    if (releaseOfRun.get(runId) !== releaseId) continue;
    if (r.label !== 'signal' && r.label !== 'noise') {
      skipped++;
      continue;
    }
    used.set(releaseId, {
      releaseId,
      studyId: Number(r.studyId),
      runId: r.releaseRunId == null ? null : Number(r.releaseRunId),
      version: Number(r.version),
    });
    out.push({ subject: `${r.studyId}:${r.sub}`, features: rawFeatures(r.features, r.varianceExplained), label: r.label });
  }
  return { rows: out, releases: [...used.values()].sort((a, b) => a.releaseId - b.releaseId), skipped };
}

/** Stores a trained model as the study's next version and makes it the one in use. */
export async function insertSuggestionModel(
  trx: Knex | Knex.Transaction,
  m: { studyId: number; model: unknown; report: unknown; training: TrainingRecord; createdBy: number | null },
): Promise<{ id: number; version: number }> {
  const last = await trx('suggestion_models').where({ study_id: m.studyId }).max({ v: 'version' }).first();
  const version = Number(last?.v ?? 0) + 1;
  const [id] = await trx('suggestion_models').insert({
    study_id: m.studyId,
    version,
    model: toJson(m.model),
    report: toJson(m.report),
    training: toJson(m.training),
    created_by: m.createdBy,
  });
  await trx('studies').where({ id: m.studyId }).update({ suggestion_model_id: id });
  return { id: Number(id), version };
}

function toStored(r: Record<string, unknown>): StoredModelRow {
  return {
    id: Number(r.id),
    studyId: Number(r.study_id),
    version: Number(r.version),
    model: parseJson(r.model),
    report: parseJson(r.report),
    training: parseJson<TrainingRecord>(r.training, { studies: [], releases: [], skipped: 0 })!,
    createdAt: new Date(r.created_at as string).toISOString(),
  };
}

/** The model the study uses now (null when none is trained). */
export async function activeSuggestionModel(
  { studyId }: { studyId: number },
  trx: Knex | Knex.Transaction = db,
): Promise<StoredModelRow | null> {
  const r = await trx('studies as s')
    .join('suggestion_models as m', 'm.id', 's.suggestion_model_id')
    .where('s.id', studyId)
    .first('m.id', 'm.study_id', 'm.version', 'm.model', 'm.report', 'm.training', 'm.created_at');
  return r ? toStored(r) : null;
}

/** Whether the study has a model in use (read inside the caller's transaction). */
export async function studyHasSuggestionModel({ studyId }: { studyId: number }, trx: Knex | Knex.Transaction = db): Promise<boolean> {
  const s = await trx('studies').where({ id: studyId }).first('suggestion_model_id');
  return s?.suggestion_model_id != null;
}

/** Whether raters see suggestions (after their vote), and the model in use. */
export async function suggestionSettings({
  studyId,
}: {
  studyId: number;
}): Promise<{ enabled: boolean; modelId: number | null; version: number | null }> {
  const r = await db('studies as s')
    .leftJoin('suggestion_models as m', 'm.id', 's.suggestion_model_id')
    .where('s.id', studyId)
    .first('s.suggestions_enabled as enabled', 's.suggestion_model_id as modelId', 'm.version');
  return {
    enabled: Boolean(r?.enabled),
    modelId: r?.modelId == null ? null : Number(r.modelId),
    version: r?.version == null ? null : Number(r.version),
  };
}

export async function setSuggestionsEnabled({ studyId, enabled }: { studyId: number; enabled: boolean }): Promise<void> {
  await db('studies').where({ id: studyId }).update({ suggestions_enabled: enabled });
}

/** Ready runs of a study (or one) with their current decomposition's components and features. */
export async function componentsToScore({ studyId, runId }: { studyId: number; runId?: number }, trx: Knex | Knex.Transaction = db) {
  const q = trx('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .join('runs as r', 'r.id', 'd.run_id')
    .where({ 'r.study_id': studyId, 'd.is_current': true, 'r.status': 'ready' })
    .orderBy(['r.id', 'c.idx'])
    .select('c.id as componentId', 'r.id as runId', 'c.features', 'c.variance_explained as varianceExplained');
  if (runId) q.andWhere('r.id', runId);
  const rows = await q;
  return rows.map((r) => ({
    componentId: Number(r.componentId),
    runId: Number(r.runId),
    features: rawFeatures(r.features, r.varianceExplained),
  }));
}

export async function insertSuggestions(
  trx: Knex | Knex.Transaction,
  modelId: number,
  rows: { componentId: number; runId: number; pNoise: number; label: string }[],
): Promise<void> {
  for (let i = 0; i < rows.length; i += 500) {
    const chunk = rows
      .slice(i, i + 500)
      .map((r) => ({ component_id: r.componentId, model_id: modelId, run_id: r.runId, p_noise: r.pNoise, label: r.label }));
    await trx('suggestions').insert(chunk).onConflict(['component_id', 'model_id']).merge(['p_noise', 'label']);
  }
}

/**
 * Suggestions of the model in use for the components of the run the rater has voted on — the
 * inner join on the rater's own votes is the never-anchoring rule: a component without the rater's
 * vote has no row here, so its suggestion never leaves the database.
 */
export async function suggestionsAfterVotes({
  runId,
  raterId,
  modelId,
}: {
  runId: number;
  raterId: number;
  modelId: number;
}): Promise<RaterSuggestion[]> {
  const rows = await db('suggestions as g')
    .join('votes as v', function () {
      this.on('v.component_id', 'g.component_id').andOn('v.rater_id', db.raw('?', [raterId]));
    })
    .join('suggestion_models as m', 'm.id', 'g.model_id')
    .where({ 'g.run_id': runId, 'g.model_id': modelId })
    .orderBy('g.component_id')
    .select('g.component_id as componentId', 'g.label', 'g.p_noise as pNoise', 'm.version as modelVersion');
  return rows.map((r) => ({
    componentId: Number(r.componentId),
    label: String(r.label),
    pNoise: Number(r.pNoise),
    modelVersion: Number(r.modelVersion),
  }));
}

/** Runs `work` in one transaction (for use cases that enqueue and audit together). */
export function inSuggestionTransaction<T>(work: (trx: Knex.Transaction) => Promise<T>): Promise<T> {
  return db.transaction(work);
}

/** A train job of the study that is still queued or running (null when none). */
export async function activeTrainingJob(trx: Knex | Knex.Transaction, { studyId }: { studyId: number }): Promise<number | null> {
  const r = await trx('jobs').where({ kind: 'train-suggestions', study_id: studyId }).whereIn('status', ['queued', 'running']).first('id');
  return r ? Number(r.id) : null;
}

/** The newest train job of the study (progress for the agreement page). */
export async function latestTrainingJob({ studyId }: { studyId: number }) {
  const r = await db('jobs')
    .where({ kind: 'train-suggestions', study_id: studyId })
    .orderBy('id', 'desc')
    .first('id', 'status', 'stage', 'percent', 'message', 'error', 'created_at');
  return r
    ? {
        jobId: Number(r.id),
        status: String(r.status),
        stage: r.stage as string | null,
        percent: r.percent == null ? null : Number(r.percent),
        message: (r.error ?? r.message ?? null) as string | null,
      }
    : null;
}
