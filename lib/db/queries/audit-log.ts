import 'server-only';
import type { Knex } from 'knex';
import { db, parseJson } from '@/lib/db/knex';
import type { AuditFilter } from '@/lib/audit/schema';

export type AuditRow = {
  id: number;
  createdAt: Date;
  actorId: number | null;
  actorName: string | null;
  actorEmail: string | null;
  action: string;
  targetType: string | null;
  targetId: string | null;
  studyId: number | null;
  studyName: string | null;
  detail: Record<string, unknown> | null;
  ip: string | null;
};

function filtered(filter: AuditFilter): Knex.QueryBuilder {
  const q = db('audit_log as a').leftJoin('users as u', 'u.id', 'a.actor_id').leftJoin('studies as s', 's.id', 'a.study_id');
  if (filter.actorId) q.where('a.actor_id', filter.actorId);
  if (filter.studyId) q.where('a.study_id', filter.studyId);
  // an action or an action family: "user" matches user.role_changed, user.deactivated, …
  if (filter.action)
    q.where((w) => w.where('a.action', filter.action!).orWhere('a.action', 'like', `${filter.action!.replace(/[%_\\]/g, '\\$&')}.%`));
  if (filter.from) q.where('a.created_at', '>=', `${filter.from} 00:00:00.000`);
  if (filter.to) q.where('a.created_at', '<', db.raw('DATE_ADD(?, INTERVAL 1 DAY)', [`${filter.to} 00:00:00`]));
  return q;
}

const columns = [
  'a.id',
  'a.created_at as createdAt',
  'a.actor_id as actorId',
  'u.name as actorName',
  'u.email as actorEmail',
  'a.action',
  'a.target_type as targetType',
  'a.target_id as targetId',
  'a.study_id as studyId',
  's.name as studyName',
  'a.detail',
  'a.ip',
] as const;

function normalise(r: Record<string, unknown>): AuditRow {
  return { ...(r as unknown as AuditRow), id: Number(r.id), detail: parseJson<Record<string, unknown>>(r.detail) };
}

/** One page of the audit log, newest first, with the total count for the filter. */
export async function queryAuditLog({
  filter,
  page,
  pageSize,
}: {
  filter: AuditFilter;
  page: number;
  pageSize: number;
}): Promise<{ entries: AuditRow[]; total: number; page: number; pageSize: number }> {
  const [{ total }] = await filtered(filter).count({ total: 'a.id' });
  const rows: Record<string, unknown>[] = await filtered(filter)
    .select(columns)
    .orderBy('a.id', 'desc')
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  return { entries: rows.map(normalise), total: Number(total), page, pageSize };
}

/** Every matching entry, newest first, in batches (keyset on id) for the streamed CSV export. */
export async function* iterateAuditLog({ filter, batch = 500 }: { filter: AuditFilter; batch?: number }): AsyncGenerator<AuditRow> {
  let before: number | null = null;
  for (;;) {
    const q = filtered(filter).select(columns).orderBy('a.id', 'desc').limit(batch);
    if (before !== null) q.where('a.id', '<', before);
    const rows: Record<string, unknown>[] = await q;
    for (const r of rows) yield normalise(r);
    if (rows.length < batch) return;
    before = Number(rows[rows.length - 1].id);
  }
}

/** Distinct actions and actors present in the log, for the filter form. */
export async function auditFilterChoices(): Promise<{
  actions: string[];
  actors: { id: number; name: string }[];
  studies: { id: number; name: string }[];
}> {
  const actions = (await db('audit_log').distinct('action').orderBy('action')).map((r: { action: string }) => r.action);
  const actors = await db('users').select('id', 'name').orderBy('name');
  const studies = await db('studies').select('id', 'name').orderBy('name');
  return { actions, actors, studies };
}
