import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import { ROLE_LABELS, mayHoldStudyRole, studyRoleRefusal, type Role, type StudyRole } from '@/lib/vocabulary/roles';
import { countAttempts, lockedFor } from '@/lib/auth/throttle';
import { recordAudit } from '@/lib/db/queries/audit';
import { findPendingInvitation, findStudyName, type LinkRecord } from '@/lib/db/queries/invitations';
import { createInvitation } from './create-invitation';
import { accountExists } from '@/lib/db/queries/people';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import type { UserRow } from '@/lib/db/queries/users';
import { AppError } from '@/lib/errors';
import { inTransaction } from '@/lib/db/transaction';
import { queueMail } from '@/lib/jobs/queue-mail';
import { existingAccountMail } from '@/lib/mail/templates/existing-account';
import { invitationMail } from '@/lib/mail/templates/invitation';

export type InvitationRequest = { email: string; role: Role; studyId?: number; studyRole?: StudyRole; replace?: boolean };

export type InvitationOutcome = {
  /** sent: a new invitation; replaced: a new invitation that withdrew a pending one; existing_account: no invitation, a sign-in reminder. */
  outcome: 'sent' | 'replaced' | 'existing_account';
  /** What happened, for the inviter's screen. */
  message: string;
};

/** "Rater", or "Rater, study rater in Visual Pilot". */
function offerText(role: Role | null, studyName: string | null, studyRole: StudyRole | null): string {
  return `${role ? ROLE_LABELS[role] : 'no role'}${studyName && studyRole ? `, study ${studyRole} in ${studyName}` : ''}`;
}

const day = (d: Date) => new Date(d).toISOString().slice(0, 16).replace('T', ' ');

/** The refusal that asks the inviter to confirm replacing a pending invitation (409, field "replace"). */
function pendingRefusal(email: string, pending: LinkRecord, next: string): AppError {
  return new AppError(
    'conflict',
    `An invitation to ${email} is still pending (${offerText(pending.role, pending.studyName, pending.studyRole)}; sent ${day(pending.createdAt)} UTC by ${pending.inviterName ?? 'someone'}). ` +
      `Sending this one withdraws it, and the person is invited as ${next} instead. Send it anyway?`,
    { replace: ['confirm to withdraw the pending invitation and send this one'] },
  );
}

/**
 * Invites a person by e-mail (issue 13 item 8, issue 15 items 2 and 9): the same rules as adding a
 * member (a lead invites raters and observers to studies they lead; the account role must be able
 * to hold the study role), throttled per address. Says what happened:
 * - the address already has an account → no invitation; the person gets a sign-in reminder and
 *   the inviter is told so (and pointed to the study's members to add them);
 * - an invitation to the address is pending → refused (409) until the inviter confirms
 *   (`replace: true`); then the old one is withdrawn (audited) and the new one sent;
 * - otherwise a new invitation is written and mailed.
 * The mail is queued for the worker's send-mail job (lib/jobs/queue-mail.ts: retried, and the outbox
 * keeps no live link).
 */
export async function sendInvitation({
  user,
  input,
  baseUrl,
  facility,
  ip = null,
}: {
  user: Pick<UserRow, 'id' | 'role' | 'name'>;
  input: InvitationRequest;
  baseUrl: string;
  facility: string;
  ip?: string | null;
}): Promise<InvitationOutcome> {
  if (user.role !== 'admin') {
    if (input.role !== 'rater' && input.role !== 'observer')
      throw new AppError('forbidden', 'Study leads may invite raters and observers; ask the facility admin for other roles.');
    if (input.studyRole === 'lead') throw new AppError('forbidden', 'Study leads may add raters and observers to their studies.');
    if (input.studyId && !leadsStudy(await findStudyAccess({ user, studyId: input.studyId })))
      throw new AppError('forbidden', 'You can invite people only to studies you lead.');
  }
  const studyRole = input.studyId ? (input.studyRole ?? null) : null;
  if (studyRole && !mayHoldStudyRole(input.role, studyRole)) {
    throw new AppError('validation', `The invitation is not valid (studyRole): ${studyRoleRefusal(input.role, studyRole)}`, {
      studyRole: [studyRoleRefusal(input.role, studyRole)],
    });
  }
  let studyName: string | null = null;
  if (input.studyId) {
    studyName = await findStudyName({ studyId: input.studyId });
    if (!studyName) throw new AppError('validation', 'That study was not found.', { studyId: ['That study was not found.'] });
  }
  const key = `invite:email:${input.email}` as const;
  const wait = await lockedFor(key);
  if (wait > 0)
    throw new AppError('too_many_requests', `Too many invitations to this address. Try again in ${Math.ceil(wait / 60000)} minutes.`);

  if (await accountExists({ email: input.email })) {
    await countAttempts([key]);
    await recordAudit({
      actorId: user.id,
      action: 'invitation.existing_account',
      targetType: 'email',
      targetId: null,
      studyId: input.studyId ?? null,
      detail: { email: input.email },
      ip,
    });
    const content = existingAccountMail({
      facility,
      inviterName: user.name,
      signInUrl: `${baseUrl}/sign-in`,
      forgotUrl: `${baseUrl}/reset-password`,
    });
    await inTransaction((trx) => queueMail(trx, { to: input.email, template: 'existing-account', content, secrets: [] }));
    return {
      outcome: 'existing_account',
      message:
        `${input.email} already has an account, so no invitation was sent; they were e-mailed a reminder to sign in. ` +
        (studyName
          ? `To give them a place in ${studyName}, add them under the study's members.`
          : "To give them a place in a study, add them under that study's members."),
    };
  }
  const offer = offerText(input.role, studyName, studyRole);
  const pending = await findPendingInvitation({ email: input.email });
  if (pending && !input.replace) throw pendingRefusal(input.email, pending, offer);

  await countAttempts([key]);
  const { token, expiresAt } = await createInvitation({
    email: input.email,
    role: input.role,
    studyId: input.studyId ?? null,
    studyRole,
    invitedBy: user.id,
  });
  const url = `${baseUrl}/invitations/${token}`;
  const content = invitationMail({
    facility,
    inviterName: user.name,
    role: input.role,
    studyName,
    studyRole: studyRole ?? undefined,
    url,
    expiresAt,
  });
  await inTransaction((trx) => queueMail(trx, { to: input.email, template: 'invite', content, secrets: [url, token] }));
  return {
    outcome: pending ? 'replaced' : 'sent',
    message: pending
      ? `The pending invitation to ${input.email} (${offerText(pending.role, pending.studyName, pending.studyRole)}) was withdrawn; a new invitation (${offer}) is on its way.`
      : `An invitation (${offer}) is on its way to ${input.email}.`,
  };
}
