import type { Metadata } from 'next';
import Link from 'next/link';
import { studyPageAccess } from '@/lib/auth/page-access';
import { listStudyAssignments } from '@/lib/assignments/list-study-assignments';
import { AssignmentsTable } from '@/components/assignments/assignments-table';
import { Panel } from '@/components/ui/panel';

export const metadata: Metadata = { title: 'Assignments' };

export default async function AssignmentsPage({ params }: { params: Promise<{ id: string }> }) {
  const { user, access } = await studyPageAccess('runs.manage', (await params).id, { studyRule: 'lead' });
  const id = access.studyId;
  const initial = await listStudyAssignments({ user, studyId: id });
  return (
    <div className="flex flex-col gap-6">
      <div>
        <p className="text-xs text-ink-faint">
          <Link href={`/studies/${id}`} className="hover:underline">
            {access.name}
          </Link>
        </p>
        <h1 className="text-xl font-semibold">Assignments</h1>
        <p className="max-w-3xl text-sm text-ink-muted">
          Raters are assigned automatically when a run is ready, balancing open work. Here you add, remove or hand over raters and set due
          dates. Each rater gets one e-mail per batch listing the runs newly assigned to them; you get an e-mail when a run&apos;s votes are
          complete, and a daily summary of overdue work.
        </p>
      </div>
      <Panel title="Runs and raters">
        <AssignmentsTable studyId={id} initial={JSON.parse(JSON.stringify(initial))} />
      </Panel>
    </div>
  );
}
