import { handler } from '@/lib/api/handler';
import { accessChangeSchema, userIdParams } from '@/lib/people/schema';
import { updateAccess } from '@/lib/people/update-access';
import { auditAddress } from '@/lib/auth/client-address';

// PATCH /api/admin/users/:id – change a person's role or (de)activate them; the last active admin stays (409)
export const PATCH = handler(
  { permission: 'users.manage', params: userIdParams, body: accessChangeSchema, what: 'The change' },
  async ({ req, user, params, body }) => {
    const result = await updateAccess({ actorId: user.id, userId: params.id, role: body.role, active: body.active, ip: auditAddress(req) });
    return { ok: true, user: result };
  },
);
