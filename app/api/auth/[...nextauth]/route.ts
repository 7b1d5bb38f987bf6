import NextAuth from 'next-auth';
import { authOptions } from '@/lib/auth/options';
import { signInSchema } from '@/lib/auth/schemas';
import { AppError } from '@/lib/errors';

const nextAuth = NextAuth(authOptions);

// GET /api/auth/* – next-auth's session, csrf and provider endpoints
export const GET = nextAuth;

// POST /api/auth/* – sign-in and sign-out; a malformed credentials body is refused with 422 before next-auth
export async function POST(req: Request, ctx: { params: Promise<{ nextauth: string[] }> }) {
  const { nextauth } = await ctx.params;
  if (nextauth.join('/') === 'callback/credentials') {
    const form = Object.fromEntries(
      (
        await req
          .clone()
          .formData()
          .catch(() => new FormData())
      ).entries(),
    );
    const parsed = signInSchema.safeParse(form);
    if (!parsed.success) return AppError.fromZod(parsed.error, 'The sign-in form').toResponse();
  }
  return nextAuth(req, ctx);
}
