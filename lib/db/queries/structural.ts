import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';

/** Points the run at a new structural underlay (or none); returns the key it replaced. */
export async function setRunStructural(
  { runId, key, name }: { runId: number; key: string | null; name: string | null },
  trx: Knex | Knex.Transaction = db,
): Promise<string | null> {
  const before = await trx('runs').where({ id: runId }).forUpdate().first('structural_key as key');
  await trx('runs').where({ id: runId }).update({ structural_key: key, structural_name: name });
  return (before?.key as string | null | undefined) ?? null;
}
