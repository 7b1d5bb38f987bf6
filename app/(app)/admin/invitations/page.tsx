import type { Metadata } from 'next';
import { requirePageUser } from '@/lib/auth/session';
import { listInvitations } from '@/lib/invitations/list-invitations';
import { invitableStudies } from '@/lib/db/queries/people';
import { ROLES, type Role } from '@/lib/vocabulary/roles';
import { inviteTtlMs } from '@/lib/auth/tokens';
import { Panel } from '@/components/ui/panel';
import { AdminTabs } from '@/components/admin/admin-tabs';
import { InviteForm } from '@/components/admin/invite-form';
import { InvitationsList, type InvitationView } from '@/components/admin/invitations-list';

export const metadata: Metadata = { title: 'Invitations' };

// Facility admins invite anyone with any role; study leads invite raters and observers, to their own studies.
export default async function InvitationsPage() {
  const user = await requirePageUser('invitations.create');
  const isAdmin = user.role === 'admin';
  const roles: Role[] = isAdmin ? [...ROLES] : ['rater', 'observer'];
  const studies = await invitableStudies({ userId: user.id, role: user.role });
  const invitations: InvitationView[] = (await listInvitations({ invitedBy: isAdmin ? undefined : user.id })).map((i) => ({
    id: i.id,
    email: i.email,
    role: i.role,
    studyName: i.studyName,
    studyRole: i.studyRole,
    inviterName: i.inviterName,
    state: i.state,
    createdAt: new Date(i.createdAt).toISOString(),
    expiresAt: new Date(i.expiresAt).toISOString(),
    usedAt: i.usedAt ? new Date(i.usedAt).toISOString() : null,
  }));
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold">{isAdmin ? 'Facility' : 'Invite people'}</h1>
      <AdminTabs role={user.role} current="/admin/invitations" />
      <Panel title="Invite by e-mail">
        <p className="mb-4 text-sm text-ink-muted">
          The person gets a link that works once and expires in {Math.round(inviteTtlMs() / 86_400_000)} days; they choose their name and
          password.
        </p>
        <InviteForm roles={roles} studies={studies} studyRoles={isAdmin ? ['lead', 'rater', 'observer'] : ['rater', 'observer']} />
      </Panel>
      <Panel title={isAdmin ? 'Invitations' : 'Your invitations'}>
        <InvitationsList invitations={invitations} />
      </Panel>
    </div>
  );
}
