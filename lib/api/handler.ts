import 'server-only';
import type { z } from 'zod';
import { requireUser } from '@/lib/auth/session';
import type { Action } from '@/lib/auth/permissions';
import type { UserRow } from '@/lib/db/queries/users';
import { AppError, errorResponse } from '@/lib/errors';
import { checkOrigin, readJsonBody } from './request-guards';

type Schema = z.ZodType;
type Out<S> = S extends Schema ? z.output<S> : undefined;

export type HandlerSpec<Q, B, P> = {
  /** An action from lib/auth/permissions.ts, or 'public' for the few routes anyone may call. */
  permission: Action | 'public';
  query?: Q;
  body?: B;
  params?: P;
  /** Describes the request in validation messages, e.g. "The vote". */
  what?: string;
};

export type HandlerContext<Q, B, P, U> = {
  req: Request;
  user: U;
  query: Out<Q>;
  body: Out<B>;
  params: Out<P>;
};

type RouteContext = { params: Promise<Record<string, string | string[]>> };

function parse<S extends Schema | undefined>(schema: S, value: unknown, what: string): Out<S> {
  if (!schema) return undefined as Out<S>;
  const result = schema.safeParse(value);
  if (!result.success) throw AppError.fromZod(result.error, what);
  return result.data as Out<S>;
}

/**
 * The one wrapper for route handlers: refuse state changes from other sites (Origin/Referer) →
 * authenticate → check the permission → validate params, query and body with zod (a body is JSON
 * only, 415 otherwise, and at most 64 KB, 413 otherwise) → run. Row scoping is the handler's job,
 * in its queries' WHERE clauses. Upload routes declare no body and read the stream themselves.
 * Errors become JSON responses (AppError → its status; anything else → logged, generic 500).
 */
export function handler<
  Q extends Schema | undefined = undefined,
  B extends Schema | undefined = undefined,
  P extends Schema | undefined = undefined,
  Perm extends Action | 'public' = Action | 'public',
>(
  spec: HandlerSpec<Q, B, P> & { permission: Perm },
  fn: (ctx: HandlerContext<Q, B, P, Perm extends 'public' ? UserRow | null : UserRow>) => Promise<Response | unknown>,
) {
  return async (req: Request, context: RouteContext): Promise<Response> => {
    try {
      checkOrigin(req);
      const user = spec.permission === 'public' ? null : await requireUser(spec.permission);
      const what = spec.what ?? 'The request';
      const params = parse(spec.params as P, context?.params ? await context.params : {}, `${what}'s address`);
      const query = parse(spec.query as Q, Object.fromEntries(new URL(req.url).searchParams), `${what}'s query`);
      const body = spec.body ? parse(spec.body as B, await readJsonBody(req), what) : (undefined as Out<B>);
      const result = await fn({ req, user: user as never, query, body, params });
      return result instanceof Response ? result : Response.json(result ?? { ok: true });
    } catch (err) {
      return errorResponse(err, `${req.method} ${new URL(req.url).pathname}`);
    }
  };
}
