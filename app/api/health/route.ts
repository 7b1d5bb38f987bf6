import { handler } from '@/lib/api/handler';
import { readiness } from '@/lib/health';

// GET /api/health – readiness for the start script, load balancers and monitoring:
// 200 {ready: true} when the secret and the database are there, else 503 with the reasons
export const GET = handler({ permission: 'public' }, async () => {
  const state = await readiness();
  return Response.json(state, { status: state.ready ? 200 : 503, headers: { 'cache-control': 'no-store' } });
});
