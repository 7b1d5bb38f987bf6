// A storage fault for the admin's alert (audit action storage.fault, read by storage-use.ts
// recentStorageFaults), written where no `server-only` module may be imported: the worker.
import type { Knex } from 'knex';

/** One storage.fault entry (no actor): the fault's kind, the error code and where it happened. */
export async function recordStorageFault(db: Knex, detail: { kind: string; code?: string; where: string }): Promise<void> {
  await db('audit_log').insert({
    action: 'storage.fault',
    target_type: 'storage',
    detail: JSON.stringify({ kind: detail.kind, code: detail.code, where: detail.where }),
  });
}
