import type { Metadata } from 'next';
import Link from 'next/link';
import { requirePageUser } from '@/lib/auth/session';
import { can } from '@/lib/auth/permissions';
import { listStudiesForUser } from '@/lib/db/queries/studies';
import { StudyList } from '@/components/home/study-list';

export const metadata: Metadata = { title: 'Studies' };

export default async function StudiesPage() {
  const user = await requirePageUser('studies.read');
  const studies = await listStudiesForUser({ user });
  return (
    <div className="flex flex-col gap-6">
      <div className="flex items-center justify-between">
        <h1 className="text-xl font-semibold">Studies</h1>
        {can(user.role, 'studies.create') ? (
          <Link
            href="/studies/new"
            className="rounded bg-lumen px-3 py-1.5 text-sm font-medium text-ground hover:bg-lumen-strong"
            data-testid="new-study"
          >
            New study
          </Link>
        ) : null}
      </div>
      <StudyList title={user.role === 'admin' ? 'All studies' : 'Your studies'} studies={studies} empty="No study yet." />
    </div>
  );
}
