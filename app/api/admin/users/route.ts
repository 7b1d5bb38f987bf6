import { handler } from '@/lib/api/handler';
import { listUsers } from '@/lib/db/queries/users';

// GET /api/admin/users – every account with role, status and last sign-in (facility admin)
export const GET = handler({ permission: 'users.manage' }, async () => ({ users: await listUsers() }));
