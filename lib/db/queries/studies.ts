import 'server-only';
import { db } from '@/lib/db/knex';
import type { UserRow } from './users';
import type { Knex } from 'knex';
import { parseJson, toJson } from '@/lib/db/knex';
import type { ConsensusRule, DimSetting, LowReproducibilityPolicy, NoiseKindKey, ProtocolValues } from '@/lib/vocabulary/protocol';

export type StudySummary = {
  id: number;
  name: string;
  description: string | null;
  studyRole: string | null;
  runs: number;
  readyRuns: number;
};

/**
 * Studies the user may see: every study for an admin, otherwise the studies they are a member of.
 * Scoping is in the WHERE clause, not in the page.
 */
export async function listStudiesForUser({ user }: { user: Pick<UserRow, 'id' | 'role'> }): Promise<StudySummary[]> {
  const query = db('studies as s')
    .leftJoin('study_members as m', function () {
      this.on('m.study_id', 's.id').andOn('m.user_id', db.raw('?', [user.id]));
    })
    .leftJoin('runs as r', 'r.study_id', 's.id')
    .select(
      's.id',
      's.name',
      's.description',
      'm.study_role as studyRole',
      db.raw('COUNT(r.id) as runs'),
      db.raw("SUM(CASE WHEN r.status = 'ready' THEN 1 ELSE 0 END) as readyRuns"),
    )
    .where('s.archived', false)
    .groupBy('s.id', 's.name', 's.description', 'm.study_role')
    .orderBy('s.name');
  if (user.role !== 'admin') query.whereNotNull('m.user_id');
  const rows = await query;
  return rows.map((r) => ({ ...r, runs: Number(r.runs), readyRuns: Number(r.readyRuns ?? 0) }));
}

// ——— one study: protocol, access, create and update ———

/** A study's protocol as the app uses it (camelCase, booleans, parsed JSON). */
export type StudyDetail = {
  id: number;
  name: string;
  description: string;
  ratersPerRun: number;
  consensusRule: ConsensusRule;
  allowUncertain: boolean;
  labelSet: string[];
  noiseKinds: NoiseKindKey[];
  blinding: boolean;
  showVotesAfterSubmit: boolean;
  dropVolumes: number;
  dimMethod: DimSetting;
  fixedComponents: number | null;
  varianceFraction: number | null;
  varianceNorm: boolean;
  detrend: boolean;
  reproducibilityThreshold: number;
  lowReproducibility: LowReproducibilityPolicy;
  createdBy: number;
  createdAt: Date;
};

const studyColumns = [
  's.id',
  's.name',
  's.description',
  's.raters_per_run',
  's.consensus_rule',
  's.label_set',
  's.noise_kinds',
  's.blinding',
  's.show_votes_after_submit',
  's.drop_volumes',
  's.dim_method',
  's.fixed_components',
  's.variance_fraction',
  's.variance_norm',
  's.detrend',
  's.reproducibility_threshold',
  's.low_reproducibility',
  's.created_by',
  's.created_at',
] as const;

function toStudy(r: Record<string, unknown>): StudyDetail {
  const labelSet = parseJson<string[]>(r.label_set, []) ?? [];
  return {
    id: Number(r.id),
    name: String(r.name),
    description: (r.description as string | null) ?? '',
    ratersPerRun: Number(r.raters_per_run),
    consensusRule: r.consensus_rule as ConsensusRule,
    allowUncertain: labelSet.includes('uncertain'),
    labelSet,
    noiseKinds: (parseJson<NoiseKindKey[]>(r.noise_kinds, []) ?? []) as NoiseKindKey[],
    blinding: Boolean(r.blinding),
    showVotesAfterSubmit: Boolean(r.show_votes_after_submit),
    dropVolumes: Number(r.drop_volumes),
    dimMethod: r.dim_method as DimSetting,
    fixedComponents: r.fixed_components == null ? null : Number(r.fixed_components),
    varianceFraction: r.variance_fraction == null ? null : Number(r.variance_fraction),
    varianceNorm: Boolean(r.variance_norm),
    detrend: Boolean(r.detrend),
    reproducibilityThreshold: r.reproducibility_threshold == null ? 0.8 : Number(r.reproducibility_threshold),
    lowReproducibility: (r.low_reproducibility as LowReproducibilityPolicy | null) ?? 'flag',
    createdBy: Number(r.created_by),
    createdAt: r.created_at as Date,
  };
}

/** A study's protocol (null when there is no such study, or it is archived). Who may see it is findStudyAccess's answer. */
export async function findStudyDetail({ studyId }: { studyId: number }): Promise<StudyDetail | null> {
  const row = await db('studies as s').where('s.id', studyId).andWhere('s.archived', false).first(studyColumns);
  return row ? toStudy(row) : null;
}

function protocolRow(v: Partial<ProtocolValues>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  if (v.name !== undefined) row.name = v.name;
  if (v.description !== undefined) row.description = v.description || null;
  if (v.ratersPerRun !== undefined) row.raters_per_run = v.ratersPerRun;
  if (v.consensusRule !== undefined) row.consensus_rule = v.consensusRule;
  if (v.allowUncertain !== undefined) row.label_set = toJson(v.allowUncertain ? ['signal', 'noise', 'uncertain'] : ['signal', 'noise']);
  if (v.noiseKinds !== undefined) row.noise_kinds = toJson(v.noiseKinds);
  if (v.blinding !== undefined) row.blinding = v.blinding;
  if (v.showVotesAfterSubmit !== undefined) row.show_votes_after_submit = v.showVotesAfterSubmit;
  if (v.dropVolumes !== undefined) row.drop_volumes = v.dropVolumes;
  if (v.dimMethod !== undefined) {
    row.dim_method = v.dimMethod;
    row.fixed_components = v.dimMethod === 'fixed' ? (v.fixedComponents ?? null) : null;
    row.variance_fraction = v.dimMethod === 'variance' ? (v.varianceFraction ?? null) : null;
  }
  if (v.varianceNorm !== undefined) row.variance_norm = v.varianceNorm;
  if (v.detrend !== undefined) row.detrend = v.detrend;
  if (v.reproducibilityThreshold !== undefined) row.reproducibility_threshold = v.reproducibilityThreshold;
  if (v.lowReproducibility !== undefined) row.low_reproducibility = v.lowReproducibility;
  return row;
}

/** Writes a study and makes its creator a lead member; returns its id. */
export async function insertStudy(
  trx: Knex.Transaction,
  { createdBy, values }: { createdBy: number; values: ProtocolValues },
): Promise<number> {
  const [id] = await trx('studies').insert({ ...protocolRow(values), created_by: createdBy });
  await trx('study_members').insert({ study_id: id, user_id: createdBy, study_role: 'lead', added_by: createdBy });
  return Number(id);
}

/** Writes the given protocol fields of a study; returns false when there was nothing to change. */
export async function writeProtocol(
  trx: Knex.Transaction,
  { studyId, values }: { studyId: number; values: Partial<ProtocolValues> },
): Promise<boolean> {
  const row = protocolRow(values);
  if (Object.keys(row).length === 0) return false;
  await trx('studies').where({ id: studyId }).update(row);
  return true;
}

/** Whether an update carries any protocol field. */
export function changesProtocol(values: Partial<ProtocolValues>): boolean {
  return Object.keys(protocolRow(values)).length > 0;
}

/** A study's stored row as it is (every column, snake_case), for the methods paragraph and the report; no access check: callers scope. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- the raw row, read column by column by its callers
export async function findStudyRow({ studyId }: { studyId: number }): Promise<Record<string, any> | undefined> {
  return db('studies').where({ id: studyId }).first();
}
