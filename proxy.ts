import { NextResponse, type NextRequest } from 'next/server';
import { newNonce, pageCsp } from '@/lib/server/csp';

// Two jobs for every page request:
// 1. the Content-Security-Policy with a fresh nonce (lib/server/csp.ts): set on the request, where
//    Next.js reads it to put the nonce on its own scripts, and on the response;
// 2. visitors without a session cookie go to sign-in. This is convenience only: every page and
//    route handler checks the session and the permission itself on the server.
const SESSION_COOKIES = ['next-auth.session-token', '__Secure-next-auth.session-token'];
const OPEN_PAGES = /^\/(sign-in|invitations|reset-password|forgot-password)(\/|$)/;

export function proxy(request: NextRequest) {
  const hasSession = SESSION_COOKIES.some((name) => request.cookies.has(name));
  if (!hasSession && !OPEN_PAGES.test(request.nextUrl.pathname)) {
    return NextResponse.redirect(new URL('/sign-in', request.url));
  }
  const csp = pageCsp(newNonce());
  const headers = new Headers(request.headers);
  headers.set('content-security-policy', csp);
  const response = NextResponse.next({ request: { headers } });
  response.headers.set('Content-Security-Policy', csp);
  return response;
}

export const config = {
  // Pages only: API routes answer 401 themselves and get their policy from next.config.mjs; static files stay open.
  matcher: ['/((?!api|_next/static|_next/image|favicon.ico|icon.svg|fonts).*)'],
};
