/**
 * For integration tests: calls a real route handler export (GET/PUT/POST from app/api/…) as a
 * given user. The test file mocks next-auth's getServerSession to return `currentSession()`.
 */
let sessionUserId: number | null = null;

export function actAs(userId: number | null) {
  sessionUserId = userId;
}

export function currentSession() {
  return sessionUserId == null ? null : { user: { id: sessionUserId }, expires: new Date(Date.now() + 3600_000).toISOString() };
}

type RouteFn = (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) => Promise<Response>;

/** Calls `fn` like Next.js does and returns the status and parsed JSON. */
export async function callRoute(
  fn: RouteFn,
  { method = 'GET', url, params, body }: { method?: string; url: string; params: Record<string, string>; body?: unknown },
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- each test reads the JSON shape its route answers with
): Promise<{ status: number; json: any; res: Response }> {
  const req = new Request(`http://localhost${url}`, {
    method,
    headers: body === undefined ? {} : { 'content-type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const res = await fn(req, { params: Promise.resolve(params) });
  const type = res.headers.get('content-type') ?? '';
  const json = type.includes('json') ? await res.json() : null;
  return { status: res.status, json, res };
}
