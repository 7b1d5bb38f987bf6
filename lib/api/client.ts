/** Result of a JSON call from the browser: ok with data, or the server's message and field errors. */
export type ApiResult<T> =
  | { ok: true; data: T }
  | { ok: false; status: number; message: string; fields?: Record<string, string[]> };

async function call<T>(method: string, url: string, body?: unknown): Promise<ApiResult<T>> {
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      headers: body === undefined ? undefined : { 'Content-Type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    return { ok: false, status: 0, message: 'The server cannot be reached. Check your connection and try again.' };
  }
  const payload = await res.json().catch(() => null);
  if (res.ok) return { ok: true, data: payload as T };
  return {
    ok: false,
    status: res.status,
    message: payload?.error?.message ?? `The server answered ${res.status}.`,
    fields: payload?.error?.fields,
  };
}

export const getJson = <T>(url: string) => call<T>('GET', url);
export const postJson = <T>(url: string, body: unknown) => call<T>('POST', url, body);
export const putJson = <T>(url: string, body: unknown) => call<T>('PUT', url, body);
export const deleteJson = <T>(url: string) => call<T>('DELETE', url);
export const patchJson = <T>(url: string, body: unknown) => call<T>('PATCH', url, body);
