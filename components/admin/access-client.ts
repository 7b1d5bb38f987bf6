import type { AccessChange } from '@/lib/people/schema';
import { deleteJson, patchJson, type ApiResult } from '@/lib/api/client';

/** PATCH /api/admin/users/:id from the browser. */
export const patchAccess = (id: number, change: AccessChange): Promise<ApiResult<{ ok: true }>> =>
  patchJson(`/api/admin/users/${id}`, change);

/** DELETE /api/admin/users/:id/sessions from the browser ("sign out everywhere"). */
export const endSessions = (id: number): Promise<ApiResult<{ ok: true }>> => deleteJson(`/api/admin/users/${id}/sessions`);
