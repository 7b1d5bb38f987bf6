import type { Metadata } from 'next';
import { requirePageUser } from '@/lib/auth/session';
import { listPeople } from '@/lib/db/queries/people';
import { recentStorageFaults } from '@/lib/db/queries/storage-use';
import { Notice } from '@/components/ui/notice';
import { Panel } from '@/components/ui/panel';
import { AdminTabs } from '@/components/admin/admin-tabs';
import { PeopleTable, type PersonView } from '@/components/admin/people-table';
import { ExecutorPanel } from '@/components/admin/executor-panel';
import { executorStatus } from '@/lib/worker/executors/executor-status';

export const metadata: Metadata = { title: 'Facility' };

export default async function AdminPage() {
  const user = await requirePageUser('users.manage');
  const people: PersonView[] = (await listPeople()).map((p) => ({
    id: p.id,
    email: p.email,
    name: p.name,
    role: p.role,
    active: p.active,
    lastSignInAt: p.lastSignInAt ? new Date(p.lastSignInAt).toISOString() : null,
    memberships: p.memberships.map((m) => ({ studyId: m.studyId, studyName: m.studyName, studyRole: m.studyRole })),
  }));
  const faults = await recentStorageFaults();
  const executor = await executorStatus();
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold" data-testid="admin-heading">
        Facility
      </h1>
      {faults.map((f) => (
        <Notice key={f.kind} kind="error" testId={`storage-fault-${f.kind}`}>
          {f.kind === 'full'
            ? 'The storage (QUORUM_UPLOADS_DIR) was full'
            : 'The storage (QUORUM_UPLOADS_DIR) could not be written (permission denied)'}{' '}
          {f.count} time{f.count === 1 ? '' : 's'} in the last 24 hours, last at {f.lastAt.toISOString().slice(0, 16).replace('T', ' ')}{' '}
          UTC: uploads and results were refused.{' '}
          {f.kind === 'full'
            ? 'Free space or move the storage to a larger disk.'
            : "Give the app's user write access to the storage folder."}{' '}
          The server log has the details.
        </Notice>
      ))}
      <AdminTabs role={user.role} current="/admin" />
      <Panel title="People">
        <PeopleTable people={people} currentUserId={user.id} />
      </Panel>
      <Panel title="Where decompositions run">
        <ExecutorPanel status={executor} />
      </Panel>
    </div>
  );
}
