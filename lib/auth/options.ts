import 'server-only';
import type { NextAuthOptions } from 'next-auth';
import Credentials from 'next-auth/providers/credentials';
import { hashPassword, verifyPassword } from './password';
import { signInSchema } from './schemas';
import {
  ACCOUNT_POLICY,
  ADDRESS_POLICY,
  PAIR_POLICY,
  clearFailures,
  lockedFor,
  pairKey,
  recordFailure,
  waitText,
  type ThrottleKey,
  type ThrottlePolicy,
} from './throttle';
import { authSecret } from './secret';
import { SESSION_MAX_AGE_S } from './session-lifetime';
import { clientAddress } from './client-address';
import { randomBytes } from 'node:crypto';
import { findCredentialsByEmail, recordSignIn } from '@/lib/db/queries/users';
import { endSession, sessionVersionOf } from '@/lib/db/queries/sessions';
import { recordAudit } from '@/lib/db/queries/audit';

export const SIGN_IN_WRONG = 'E-mail or password is wrong.';
export const SIGN_IN_UNAVAILABLE =
  'Signing in is not possible right now. Try again in a few minutes; if it persists, tell the facility admin.';

// A real hash to compare against for unknown accounts, so timing does not reveal which addresses exist.
let dummyHash: Promise<string> | undefined;
const getDummyHash = () => (dummyHash ??= hashPassword('no-such-account-placeholder'));

/** A refusal meant for the person signing in (wrong password, throttled); anything else is internal. */
class SignInRefusal extends Error {}

/** Checks e-mail and password against the throttles and the database; see authOptions below. */
async function authorizeCredentials(credentials: Record<string, string> | undefined, headers: Record<string, unknown> | undefined) {
  const parsed = signInSchema.safeParse(credentials ?? {});
  if (!parsed.success) throw new SignInRefusal(SIGN_IN_WRONG);
  const { email, password } = parsed.data;
  // throttled per (account, address) and per address with growing waits, never per account
  // alone while the address is known: an attacker elsewhere cannot keep the owner out
  const address = clientAddress(headers);
  const throttles: [ThrottleKey, ThrottlePolicy][] =
    address === 'direct'
      ? [[`account:${email}`, ACCOUNT_POLICY]]
      : [
          [pairKey(email, address), PAIR_POLICY],
          [`ip:${address}`, ADDRESS_POLICY],
        ];
  const wait = Math.max(...(await Promise.all(throttles.map(([key]) => lockedFor(key)))));
  if (wait > 0) throw new SignInRefusal(`Too many failed sign-ins. Try again in ${waitText(wait)}.`);
  const found = await findCredentialsByEmail({ email });
  const ok = await verifyPassword(password, found?.passwordHash ?? (await getDummyHash()));
  if (!found || !ok || !found.user.active) {
    for (const [key, policy] of throttles) await recordFailure(key, policy);
    throw new SignInRefusal(SIGN_IN_WRONG);
  }
  // success clears this account's own key; the address keeps its count (one valid account
  // must not reset an address that is guessing others)
  await clearFailures(throttles[0][0]);
  await recordSignIn({ id: found.user.id });
  await recordAudit({ actorId: found.user.id, action: 'auth.sign_in', targetType: 'user', targetId: found.user.id });
  const sv = await sessionVersionOf({ id: found.user.id });
  return { id: String(found.user.id), email: found.user.email, name: found.user.name, role: found.user.role, sv };
}

export const authOptions: NextAuthOptions = {
  // read at request time, not at import: the build has no secret, a running server must
  get secret() {
    return authSecret();
  },
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: '/sign-in', error: '/sign-in' },
  providers: [
    Credentials({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        try {
          return await authorizeCredentials(credentials, req?.headers as Record<string, unknown> | undefined);
        } catch (err) {
          if (err instanceof SignInRefusal) throw err;
          // the database or anything else: logged in full, one sentence for the person (it ends
          // up in the sign-in page's address, so never driver text, SQL or host names)
          console.error('[sign-in] internal error:', err);
          throw new Error(SIGN_IN_UNAVAILABLE);
        }
      },
    }),
  ],
  events: {
    // signing out ends this session on the server too: a copied cookie stops working at once
    async signOut({ token }) {
      if (token?.sid && token.uid) await endSession({ sid: token.sid, userId: token.uid });
    },
  },
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.role = user.role;
        // this session's id (sign-out ends it) and the account's session version (lib/auth/session.ts)
        token.sid = randomBytes(16).toString('hex');
        token.sv = user.sv ?? 0;
      }
      return token;
    },
    async session({ session, token }) {
      session.user = {
        id: token.uid ?? 0,
        email: token.email ?? '',
        name: token.name ?? '',
        role: token.role ?? 'observer',
        sid: token.sid ?? '',
        sv: token.sv ?? -1,
      };
      return session;
    },
  },
};
