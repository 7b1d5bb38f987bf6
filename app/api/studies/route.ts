import { handler } from '@/lib/api/handler';
import { studySchema } from '@/lib/studies/schema';
import { listStudiesForUser } from '@/lib/db/queries/studies';
import { createStudy } from '@/lib/studies/create-study';

// GET /api/studies – the studies the caller may see (admins: all; others: their memberships)
export const GET = handler({ permission: 'studies.read' }, async ({ user }) => ({ studies: await listStudiesForUser({ user }) }));

// POST /api/studies – create a study with its protocol; the creator becomes its lead
export const POST = handler({ permission: 'studies.create', body: studySchema, what: 'The study' }, async ({ user, body }) => {
  const id = await createStudy({ user, values: body });
  return Response.json({ id }, { status: 201 });
});
