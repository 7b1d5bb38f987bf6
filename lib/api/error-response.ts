import { ZodError } from 'zod';
import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/db/queries/audit';
import { STORAGE_FAULT_MESSAGES, storageFaultKind } from '@/lib/storage/faults';

// The database is stopped, restarting, or went away under a query (mysql2 and MariaDB codes)
const DB_DOWN_CODES = new Set([
  'ECONNREFUSED',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'ER_ACCESS_DENIED_ERROR',
  'ER_SERVER_SHUTDOWN',
  'ER_CONNECTION_KILLED',
  'ER_QUERY_INTERRUPTED',
  'ER_SERVER_GONE_ERROR',
]);
// network codes count only on the driver's own fatal errors (a browser that went away mid-body is ECONNRESET too)
const DB_NETWORK_CODES = new Set(['ECONNRESET', 'EPIPE', 'ETIMEDOUT']);
// mysql2 throws these without a code when a pooled connection died with the server (e.g. the
// ROLLBACK of a transaction that was in flight when the database stopped)
const DB_DOWN_MESSAGES =
  /Can't add new command when connection is in closed state|Connection lost: The server closed the connection|Pool is closed/;

/** True when `err` (or what it wraps) says the database cannot be reached right now. */
function databaseUnavailable(err: unknown): boolean {
  for (
    let e = err as { code?: string; name?: string; message?: string; fatal?: boolean; cause?: unknown } | undefined, depth = 0;
    e && depth < 4;
    e = e.cause as typeof e, depth++
  ) {
    if (e.code && DB_DOWN_CODES.has(e.code)) return true;
    if (e.code && e.fatal === true && DB_NETWORK_CODES.has(e.code)) return true;
    if (e.name === 'KnexTimeoutError') return true;
    if (typeof e.message === 'string' && DB_DOWN_MESSAGES.test(e.message)) return true;
  }
  return false;
}

/** True when the client went away while its request body was being read (Node's "aborted", ECONNRESET). */
function clientAborted(err: unknown): boolean {
  const e = err as { code?: string; message?: string; fatal?: boolean } | undefined;
  return e?.code === 'ECONNRESET' && e.fatal !== true && /^aborted$/i.test(e.message ?? '');
}

/** Turns any thrown value into a safe response: AppErrors as they are, anything else logged and generic. */
export function errorResponse(err: unknown, context: string): Response {
  if (err instanceof AppError) return err.toResponse();
  if (err instanceof ZodError) return AppError.fromZod(err).toResponse();
  if (databaseUnavailable(err)) {
    console.error(`[${context}] database unavailable:`, err);
    return new AppError('unavailable', 'The database is not reachable right now. Try again in a moment.').toResponse();
  }
  if (clientAborted(err)) {
    // nobody reads this answer; one line in the log, not an unexpected error with its stack
    console.warn(`[${context}] the client closed the connection before its request arrived in full`);
    return new AppError('bad_request', 'The request was cut off before it arrived in full. Send it again.').toResponse();
  }
  const fault = storageFaultKind(err);
  if (fault) {
    console.error(`[${context}] storage fault:`, err);
    // the admin's alert (Facility page); best effort, the person's answer does not wait for it
    void recordAudit({
      actorId: null,
      action: 'storage.fault',
      targetType: 'storage',
      detail: { kind: fault, code: (err as { code?: string }).code, where: context },
    }).catch((e) => console.error('[storage fault] could not record the alert:', e));
    return new AppError(fault === 'full' ? 'insufficient_storage' : 'unavailable', STORAGE_FAULT_MESSAGES[fault]).toResponse();
  }
  console.error(`[${context}] unexpected error:`, err);
  return new AppError('internal', 'Something went wrong on the server. The error was logged; try again.').toResponse();
}
