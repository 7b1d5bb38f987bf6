import { handler } from '@/lib/api/handler';

// GET /api/me – the signed-in user (never the password hash)
export const GET = handler({ permission: 'account.read' }, async ({ user }) => ({
  user: { id: user.id, email: user.email, name: user.name, role: user.role },
}));
