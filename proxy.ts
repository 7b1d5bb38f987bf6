import { NextResponse, type NextRequest } from 'next/server';

// Redirects visitors without a session cookie to sign-in. This is convenience only: every page and
// route handler checks the session and the permission itself on the server.
const SESSION_COOKIES = ['next-auth.session-token', '__Secure-next-auth.session-token'];

export function proxy(request: NextRequest) {
  const hasSession = SESSION_COOKIES.some((name) => request.cookies.has(name));
  if (!hasSession) {
    const url = new URL('/sign-in', request.url);
    return NextResponse.redirect(url);
  }
  return NextResponse.next();
}

export const config = {
  // Pages only: API routes answer 401 themselves; sign-in, invitations and static files stay open.
  matcher: ['/((?!api|_next|sign-in|invitations|reset-password|forgot-password|forbidden|favicon.ico|fonts).*)'],
};
