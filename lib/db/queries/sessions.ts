import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';
import { normalise as normaliseUser, publicColumns, type UserRow } from './users';

/** How long an ended session id is remembered: the session lifetime (12 h) and an hour to spare. */
const REMEMBER_ENDED_HOURS = 13;

/** The user's current session version (copied into a session token at sign-in). */
export async function sessionVersionOf({ id }: { id: number }): Promise<number> {
  const row = await db('users').where({ id }).first('session_version');
  return Number(row?.session_version ?? 0);
}

/**
 * The signed-in user of a session, or null when the session has ended: the account is missing or
 * deactivated, its session version moved on since the token was issued, or this session id was
 * signed out. One round trip, which also reads the user.
 */
export async function findSessionUser({ id, sid, sv }: { id: number; sid: string; sv: number }): Promise<UserRow | null> {
  const row = await db('users')
    .where('id', id)
    .where('active', true)
    .where('session_version', sv)
    .whereNotExists(db('ended_sessions').where({ sid }).select(db.raw('1')))
    .first(publicColumns);
  return normaliseUser(row);
}

/** Ends one session (sign-out); forgets ids whose tokens have expired anyway. */
export async function endSession({ sid, userId }: { sid: string; userId: number }): Promise<void> {
  await db('ended_sessions').insert({ sid, user_id: userId }).onConflict('sid').ignore();
  await db('ended_sessions')
    .where('ended_at', '<', db.raw(`NOW(3) - INTERVAL ${REMEMBER_ENDED_HOURS} HOUR`))
    .delete();
}

/** Ends every session of the user (raises the session version); returns the new version. */
export async function endAllSessions({ userId }: { userId: number }, trx: Knex | Knex.Transaction = db): Promise<number> {
  await trx('users').where({ id: userId }).increment('session_version', 1);
  const row = await trx('users').where({ id: userId }).first('session_version');
  return Number(row?.session_version ?? 0);
}
