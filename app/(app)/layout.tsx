import { requirePageUser } from '@/lib/auth/session';
import { AppNav } from '@/components/layout/app-nav';
import { QueryProvider } from '@/components/providers/query-provider';

export default async function SignedInLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser();
  return (
    <>
      <AppNav user={user} />
      <main className="mx-auto w-full max-w-7xl flex-1 px-4 py-6">
        <QueryProvider>{children}</QueryProvider>
      </main>
    </>
  );
}
