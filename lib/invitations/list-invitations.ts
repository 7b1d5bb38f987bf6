import 'server-only';
import { linkState, type LinkState } from '@/lib/auth/tokens';
import { listInvitationLinks, type LinkRecord } from '@/lib/db/queries/invitations';

export type InvitationListItem = LinkRecord & { state: LinkState };

/** Invitations for the facility page, newest first (admins see all; others only their own), with their state. */
export async function listInvitations({ invitedBy, limit = 200 }: { invitedBy?: number; limit?: number } = {}): Promise<
  InvitationListItem[]
> {
  const rows = await listInvitationLinks({ invitedBy, limit });
  const now = new Date();
  return rows.map((r) => ({ ...r, state: linkState(r, now) }));
}
