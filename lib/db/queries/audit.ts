import 'server-only';
import { db } from '@/lib/db/knex';
import type { Knex } from 'knex';

export type AuditEntry = {
  actorId: number | null;
  action: string;
  targetType: string;
  targetId?: number | string | null;
  studyId?: number | null;
  detail?: Record<string, unknown>;
  ip?: string | null;
};

/** Appends one entry to the audit log (inside the caller's transaction when given). There is no update or delete. */
export async function recordAudit(entry: AuditEntry, trx: Knex | Knex.Transaction = db): Promise<void> {
  await trx('audit_log').insert({
    actor_id: entry.actorId,
    action: entry.action,
    target_type: entry.targetType,
    target_id: entry.targetId == null ? null : String(entry.targetId),
    study_id: entry.studyId ?? null,
    detail: entry.detail ? JSON.stringify(entry.detail) : null,
    ip: entry.ip ?? null,
  });
}
