import type { AccessChange } from '@/lib/people/schema';
import type { ApiResult } from '@/lib/api/client';

/** PATCH /api/admin/users/:id from the browser. */
export async function patchAccess(id: number, change: AccessChange): Promise<ApiResult<{ ok: true }>> {
  let res: Response;
  try {
    res = await fetch(`/api/admin/users/${id}`, { method: 'PATCH', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(change) });
  } catch {
    return { ok: false, status: 0, message: 'The server cannot be reached. Check your connection and try again.' };
  }
  const payload = await res.json().catch(() => null);
  if (res.ok) return { ok: true, data: payload };
  return { ok: false, status: res.status, message: payload?.error?.message ?? `The server answered ${res.status}.`, fields: payload?.error?.fields };
}

/** DELETE /api/admin/users/:id/sessions from the browser ("sign out everywhere"). */
export async function endSessions(id: number): Promise<ApiResult<{ ok: true }>> {
  let res: Response;
  try {
    res = await fetch(`/api/admin/users/${id}/sessions`, { method: 'DELETE' });
  } catch {
    return { ok: false, status: 0, message: 'The server cannot be reached. Check your connection and try again.' };
  }
  const payload = await res.json().catch(() => null);
  if (res.ok) return { ok: true, data: payload };
  return { ok: false, status: res.status, message: payload?.error?.message ?? `The server answered ${res.status}.` };
}
