import { handler } from '@/lib/api/handler';
import { listPeople } from '@/lib/db/queries/people';

// GET /api/admin/users – every account with role, status, last sign-in and study memberships (facility admin)
export const GET = handler({ permission: 'users.manage' }, async () => ({ users: await listPeople() }));
