/** Result of a JSON call from the browser: ok with data, or the server's message and field errors. */
export type ApiResult<T> = { ok: true; data: T } | { ok: false; status: number; message: string; fields?: Record<string, string[]> };

/** The one browser JSON call: sends `body` as JSON when given, reads the server's `{ error }` shape. */
export async function callJson<T>(method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE', url: string, body?: unknown): Promise<ApiResult<T>> {
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

export const getJson = <T>(url: string) => callJson<T>('GET', url);
export const postJson = <T>(url: string, body: unknown) => callJson<T>('POST', url, body);
export const putJson = <T>(url: string, body: unknown) => callJson<T>('PUT', url, body);
export const patchJson = <T>(url: string, body: unknown) => callJson<T>('PATCH', url, body);
export const deleteJson = <T>(url: string) => callJson<T>('DELETE', url);

/** A failed call as an exception (for react-query mutations): the server's message, status and field errors. */
export class ApiCallError extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly fields?: Record<string, string[]>,
  ) {
    super(message);
  }
}

/** The data of a successful call, or throws ApiCallError. */
export function dataOrThrow<T>(result: ApiResult<T>): T {
  if (result.ok) return result.data;
  throw new ApiCallError(result.message, result.status, result.fields);
}
