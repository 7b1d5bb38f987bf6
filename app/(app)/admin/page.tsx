import type { Metadata } from 'next';
import { requirePageUser } from '@/lib/auth/session';
import { listPeople } from '@/lib/db/queries/people';
import { Panel } from '@/components/ui/panel';
import { AdminTabs } from '@/components/admin/admin-tabs';
import { PeopleTable, type PersonView } from '@/components/admin/people-table';

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
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold" data-testid="admin-heading">
        Facility
      </h1>
      <AdminTabs role={user.role} current="/admin" />
      <Panel title="People">
        <PeopleTable people={people} currentUserId={user.id} />
      </Panel>
    </div>
  );
}
