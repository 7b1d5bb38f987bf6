import 'server-only';
import type { z } from 'zod';
import { requireUser } from '@/lib/auth/session';
import { authenticateBearer, type TokenUser } from '@/lib/auth/access-tokens';
import { can, leadsStudy, type Action } from '@/lib/auth/permissions';
import type { Access } from '@/lib/vocabulary/roles';
import { findRunAccess, findStudyAccess } from '@/lib/db/queries/study-access';
import type { UserRow } from '@/lib/db/queries/users';
import type { ReleaseRow } from '@/lib/db/queries/releases';
import { releaseFor } from '@/lib/releases/access';
import { AppError, forbidden, notFound } from '@/lib/errors';
import { errorResponse } from './error-response';
import { checkOrigin, readJsonBody } from './request-guards';

type Schema = z.ZodType;
type Out<S> = S extends Schema ? z.output<S> : undefined;

type Auth = 'session' | 'token' | 'public';
type Scope = 'study' | 'run' | 'release';

export type HandlerSpec<Q, B, P> = {
  /**
   * Who the caller is: 'session' (the signed-in browser; the default), 'token' (a personal access
   * token sent as `Authorization: Bearer …`, for pipelines; read-only) or 'public' (anyone; the
   * permission must then be 'public').
   */
  auth?: Auth;
  /** An action from lib/auth/permissions.ts, or 'public' for the few routes anyone may call. */
  permission: Action | 'public';
  query?: Q;
  body?: B;
  params?: P;
  /** Describes the request in validation messages, e.g. "The vote". */
  what?: string;
  /**
   * The study the request is about, from the address: 'study' (`id` is the study's id), 'run' (`id`
   * is a run's id, scoped to its study) or 'release' (`releaseId`, a finished release, scoped to its
   * study). The wrapper loads the caller's Access (404 when the caller may not see it) and passes it
   * in as `access` (with the run's id, or the release row).
   */
  scope?: Scope;
  /** With a scope: 'lead' lets only the study's leads (and admins) through, 403 otherwise, saying `denied`. */
  studyRule?: 'member' | 'lead';
  /** What the caller was refused, for the 403 message, e.g. "reconciling a study you do not lead". */
  denied?: string;
};

/** The caller's access to the scoped study (with the run's id for a run scope, the release for a release scope). */
export type ScopedAccess = Access & { runId?: number; release?: ReleaseRow };

export type HandlerContext<Q, B, P, U, A = ScopedAccess | null> = {
  req: Request;
  user: U;
  /** The caller's access to the scoped study: present when the spec has a scope, else null. */
  access: A;
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

/** Loads the Access of a scoped request, or throws 404 (not the caller's to see) / 403 (not a lead). */
async function scopedAccess(
  spec: Pick<HandlerSpec<unknown, unknown, unknown>, 'scope' | 'studyRule' | 'denied'>,
  user: Pick<UserRow, 'id' | 'role'>,
  params: unknown,
): Promise<ScopedAccess> {
  const address = params as { id?: unknown; releaseId?: unknown } | undefined;
  const id = Number(spec.scope === 'release' ? address?.releaseId : address?.id);
  if (!Number.isInteger(id) || id <= 0) throw new AppError('validation', 'The address needs a numeric id.');
  let access: ScopedAccess | null;
  if (spec.scope === 'release') {
    const { release, access: studyAccess } = await releaseFor({ user, releaseId: id }); // 404 'The release' when out of reach
    access = { ...studyAccess, release };
  } else access = spec.scope === 'run' ? await findRunAccess({ user, runId: id }) : await findStudyAccess({ user, studyId: id });
  if (!access) throw notFound(spec.scope === 'run' ? 'The run' : 'The study');
  if (spec.studyRule === 'lead' && !leadsStudy(access)) throw forbidden(spec.denied ?? 'this for a study you do not lead');
  return access;
}

/** The caller by the spec's `auth`, with the permission checked (401 / 403). */
async function authenticate(spec: { auth?: Auth; permission: Action | 'public' }, req: Request): Promise<UserRow | TokenUser | null> {
  const auth = spec.auth ?? (spec.permission === 'public' ? 'public' : 'session');
  if (auth === 'public') return null;
  if (spec.permission === 'public') throw new Error('handler: a session or token route names a permission');
  if (auth === 'session') return requireUser(spec.permission);
  const user = await authenticateBearer(req);
  if (!can(user.role, spec.permission)) throw forbidden('this with an access token (its account lacks the permission)');
  return user;
}

type UserOf<Au, Perm> = Au extends 'token' ? TokenUser : Perm extends 'public' ? UserRow | null : UserRow;

/**
 * The one wrapper for route handlers: refuse state changes from other sites (Origin/Referer) →
 * authenticate (session, bearer token or none) → check the permission → validate params → load the caller's Access to the scoped
 * study or run (404 / 403 by the study-level rule) → validate query and body with zod (a body is JSON
 * only, 415 otherwise, and at most 64 KB, 413 otherwise) → run. Row scoping is the handler's job,
 * in its queries' WHERE clauses. Upload routes declare no body and read the stream themselves.
 * Errors become JSON responses (AppError → its status; anything else → logged, generic 500).
 */
export function handler<
  Q extends Schema | undefined = undefined,
  B extends Schema | undefined = undefined,
  P extends Schema | undefined = undefined,
  Perm extends Action | 'public' = Action | 'public',
  Sc extends Scope | undefined = undefined,
  Au extends Auth | undefined = undefined,
>(
  spec: HandlerSpec<Q, B, P> & { permission: Perm; scope?: Sc; auth?: Au },
  fn: (ctx: HandlerContext<Q, B, P, UserOf<Au, Perm>, Sc extends Scope ? ScopedAccess : null>) => Promise<Response | unknown>,
) {
  return async (req: Request, context: RouteContext): Promise<Response> => {
    try {
      checkOrigin(req);
      const user = await authenticate(spec, req);
      const what = spec.what ?? 'The request';
      const params = parse(spec.params as P, context?.params ? await context.params : {}, `${what}'s address`);
      const query = parse(spec.query as Q, Object.fromEntries(new URL(req.url).searchParams), `${what}'s query`);
      const access = spec.scope && user ? await scopedAccess(spec, user, params) : null;
      const body = spec.body ? parse(spec.body as B, await readJsonBody(req), what) : (undefined as Out<B>);
      const result = await fn({ req, user: user as never, access: access as never, query, body, params });
      return result instanceof Response ? result : Response.json(result ?? { ok: true });
    } catch (err) {
      return errorResponse(err, `${req.method} ${new URL(req.url).pathname}`);
    }
  };
}
