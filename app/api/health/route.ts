import { handler } from '@/lib/api/handler';
import { db } from '@/lib/db/knex';

// GET /api/health – liveness and database reachability, for the start script and monitoring
export const GET = handler({ permission: 'public' }, async () => {
  await db.raw('SELECT 1');
  return { ok: true, database: 'reachable' };
});
