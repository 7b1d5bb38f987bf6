/**
 * For integration tests: calls a real route handler export (GET/PUT/POST from app/api/…) as a
 * given user. The test file mocks next-auth's getServerSession to return `currentSession()`.
 */
let sessionUserId: number | null = null;
let sessionIds = { sid: 'test-session', sv: 0 };

/** Acts as the user in a session with the given id and session version (default: a fresh account's 0). */
export function actAs(userId: number | null, session: { sid?: string; sv?: number } = {}) {
  sessionUserId = userId;
  sessionIds = { sid: session.sid ?? 'test-session', sv: session.sv ?? 0 };
}

export function currentSession() {
  return sessionUserId == null
    ? null
    : { user: { id: sessionUserId, ...sessionIds }, expires: new Date(Date.now() + 3600_000).toISOString() };
}

type RouteFn = (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) => Promise<Response>;

/** Calls `fn` like Next.js does and returns the status and parsed JSON. */
export async function callRoute(
  fn: RouteFn,
  {
    method = 'GET',
    url,
    params,
    body,
    headers = {},
  }: { method?: string; url: string; params: Record<string, string>; body?: unknown; headers?: Record<string, string> },
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- each test reads the JSON shape its route answers with
): Promise<{ status: number; json: any; res: Response }> {
  const req = new Request(`http://localhost${url}`, {
    method,
    headers: body === undefined ? headers : { 'content-type': 'application/json', ...headers },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const res = await fn(req, { params: Promise.resolve(params) });
  const type = res.headers.get('content-type') ?? '';
  const json = type.includes('json') ? await res.json() : null;
  return { status: res.status, json, res };
}
