// One transaction for a use case (lib/<domain>/<verb-noun>.ts) that writes through several query
// functions and enqueues a job: every query and enqueueJob accept the `trx` it passes.
import type { Knex } from 'knex';
import { db } from './knex';

/**
 * Runs `work` in one transaction on the application's pool, or on `conn` when given (the worker's
 * `ctx.db`, a script's own connection); inside a transaction `conn`, a nested one (a savepoint).
 */
export function inTransaction<T>(work: (trx: Knex.Transaction) => Promise<T>, conn: Knex = db): Promise<T> {
  return conn.transaction(work);
}

/** The transaction a use case passes to the query functions it calls (opaque outside lib/db). */
export type Trx = Knex.Transaction;

/** A connection or a transaction, for code outside lib/db that passes one on to the queries (the worker's `ctx.db`). */
export type Db = Knex;
