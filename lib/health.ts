import 'server-only';
import { secretProblem } from '@/lib/auth/secret';
import { probeDatabase } from '@/lib/db/queries/health';
import type { Db } from '@/lib/db/transaction';

export type Readiness = {
  ready: boolean;
  secret: 'ok' | 'missing or weak';
  database: 'reachable' | 'unreachable';
  /** One sentence per failed check, for people and monitoring (no addresses, no driver text). */
  reasons: string[];
};

/**
 * Whether this server can serve signed-in users: in production a real session secret
 * (lib/auth/secret.ts) and, always, a database that answers. The driver's own error is logged,
 * never returned (it names hosts and ports). `conn`: another connection to check (default the application's).
 */
export async function readiness({
  env = process.env,
  conn,
}: { env?: Record<string, string | undefined>; conn?: Db } = {}): Promise<Readiness> {
  const reasons: string[] = [];
  const weak = env.NODE_ENV === 'production' && env.QUORUM_ALLOW_DEV_SECRET !== '1' ? secretProblem(env) : null;
  if (weak) reasons.push('The session secret is missing or weak: set NEXTAUTH_SECRET to a long random string and restart.');
  let database: Readiness['database'] = 'reachable';
  try {
    await probeDatabase(conn);
  } catch (err) {
    console.error('[health] database check failed:', err);
    database = 'unreachable';
    reasons.push('The database is not reachable or not migrated: check DATABASE_URL and run the migrations.');
  }
  return { ready: reasons.length === 0, secret: weak ? 'missing or weak' : 'ok', database, reasons };
}
