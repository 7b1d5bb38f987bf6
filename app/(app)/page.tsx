import type { Metadata } from 'next';
import { requirePageUser } from '@/lib/auth/session';
import { listQueueForRater } from '@/lib/db/queries/work-queue';
import { raterGateNotices } from '@/lib/db/queries/calibration-gate';
import { listStudiesForUser } from '@/lib/db/queries/studies';
import { listUsers } from '@/lib/db/queries/users';
import { RaterQueue } from '@/components/home/rater-queue';
import { StudyList } from '@/components/home/study-list';
import { Panel } from '@/components/ui/panel';

export const metadata: Metadata = { title: 'Home' };

const HEADINGS = {
  rater: 'Your rating queue',
  lead: 'Your studies',
  admin: 'Facility overview',
  observer: 'Studies you follow',
} as const;

export default async function HomePage() {
  const user = await requirePageUser();
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold" data-testid="home-heading">
        {HEADINGS[user.role]}
      </h1>
      {user.role === 'rater' ? (
        <RaterQueue items={await listQueueForRater({ raterId: user.id })} held={await raterGateNotices({ raterId: user.id })} />
      ) : null}
      {user.role === 'lead' ? (
        <StudyList title="Studies you lead" studies={await listStudiesForUser({ user })} empty="You lead no study yet." />
      ) : null}
      {user.role === 'observer' ? (
        <StudyList title="Shared with you" studies={await listStudiesForUser({ user })} empty="No study has been shared with you yet." />
      ) : null}
      {user.role === 'admin' ? <FacilityOverview /> : null}
    </div>
  );
}

async function FacilityOverview() {
  const [users, studies] = await Promise.all([listUsers(), listStudiesForUser({ user: { id: 0, role: 'admin' } })]);
  const active = users.filter((u) => u.active).length;
  return (
    <div className="grid gap-6 md:grid-cols-2">
      <Panel title="People">
        <p className="text-sm text-ink-muted">
          {active} active accounts, {users.length - active} deactivated.
        </p>
      </Panel>
      <StudyList title="All studies" studies={studies} empty="No study yet." />
    </div>
  );
}
