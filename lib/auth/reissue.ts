import 'server-only';
import { decode, encode } from 'next-auth/jwt';
import { authSecret } from './secret';
import { SESSION_MAX_AGE_S } from './session-lifetime';

const COOKIE_NAMES = ['__Secure-next-auth.session-token', 'next-auth.session-token'] as const;

function readCookie(req: Request, name: string): string | null {
  for (const part of (req.headers.get('cookie') ?? '').split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0 && part.slice(0, eq).trim() === name) return decodeURIComponent(part.slice(eq + 1).trim());
  }
  return null;
}

/**
 * A Set-Cookie value that carries the caller's own session over a session-version change (a
 * password change ends every other session, not the one that made it), or null when the request
 * has no session token of this user. The token keeps its session id; only `sv` changes.
 */
export async function reissuedSessionCookie(req: Request, { userId, sv }: { userId: number; sv: number }): Promise<string | null> {
  for (const name of COOKIE_NAMES) {
    const raw = readCookie(req, name);
    if (!raw) continue;
    const token = await decode({ token: raw, secret: authSecret() }).catch(() => null);
    if (!token || token.uid !== userId) return null;
    const value = await encode({ token: { ...token, sv }, secret: authSecret(), maxAge: SESSION_MAX_AGE_S });
    const secure = name.startsWith('__Secure-') ? '; Secure' : '';
    return `${name}=${value}; Path=/; HttpOnly; SameSite=Lax; Max-Age=${SESSION_MAX_AGE_S}${secure}`;
  }
  return null;
}
