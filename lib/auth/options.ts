import 'server-only';
import type { NextAuthOptions } from 'next-auth';
import Credentials from 'next-auth/providers/credentials';
import { hashPassword, verifyPassword } from './password';
import { signInSchema } from './schemas';
import { clearFailures, lockedFor, recordFailure, type ThrottleKey } from './throttle';
import { authSecret } from './secret';
import { addressKey } from './client-address';
import { findCredentialsByEmail, recordSignIn } from '@/lib/db/queries/users';
import { recordAudit } from '@/lib/db/queries/audit';

export const SIGN_IN_WRONG = 'E-mail or password is wrong.';

// A real hash to compare against for unknown accounts, so timing does not reveal which addresses exist.
let dummyHash: Promise<string> | undefined;
const getDummyHash = () => (dummyHash ??= hashPassword('no-such-account-placeholder'));

export const authOptions: NextAuthOptions = {
  // read at request time, not at import: the build has no secret, a running server must
  get secret() {
    return authSecret();
  },
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
  pages: { signIn: '/sign-in', error: '/sign-in' },
  providers: [
    Credentials({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) throw new Error(SIGN_IN_WRONG);
        const { email, password } = parsed.data;
        const ipKey = addressKey('ip', req?.headers as Record<string, unknown> | undefined);
        const keys: ThrottleKey[] = ipKey ? [ipKey, `account:${email}`] : [`account:${email}`];
        const waits = await Promise.all(keys.map(lockedFor));
        const wait = Math.max(...waits);
        if (wait > 0) {
          throw new Error(`Too many failed sign-ins. Try again in ${Math.ceil(wait / 60000)} minutes.`);
        }
        const found = await findCredentialsByEmail({ email });
        const ok = await verifyPassword(password, found?.passwordHash ?? (await getDummyHash()));
        if (!found || !ok || !found.user.active) {
          for (const key of keys) await recordFailure(key);
          throw new Error(SIGN_IN_WRONG);
        }
        await Promise.all(keys.map(clearFailures));
        await recordSignIn({ id: found.user.id });
        await recordAudit({ actorId: found.user.id, action: 'auth.sign_in', targetType: 'user', targetId: found.user.id });
        return { id: String(found.user.id), email: found.user.email, name: found.user.name, role: found.user.role };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.role = user.role;
      }
      return token;
    },
    async session({ session, token }) {
      session.user = {
        id: token.uid ?? 0,
        email: token.email ?? '',
        name: token.name ?? '',
        role: token.role ?? 'observer',
      };
      return session;
    },
  },
};
