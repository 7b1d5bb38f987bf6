// One transaction for a use case (lib/<domain>/<verb-noun>.ts) that writes through several query
// functions and enqueues a job: every query and enqueueJob accept the `trx` it passes.
import type { Knex } from 'knex';
import { db } from './knex';

export function inTransaction<T>(work: (trx: Knex.Transaction) => Promise<T>): Promise<T> {
  return db.transaction(work);
}

/** The transaction a use case passes to the query functions it calls (opaque outside lib/db). */
export type Trx = Knex.Transaction;
