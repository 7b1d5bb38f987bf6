import type { Access, Role, StudyRole } from '@/lib/vocabulary/roles';

/**
 * The one permission matrix. Every route handler and server action names one of these actions;
 * row scoping (which study, which run) is done in the queries on top of this.
 */
export const ACTIONS = [
  'account.read',
  'account.update',
  'tokens.manage',
  'studies.read',
  'studies.create',
  'studies.update',
  'runs.read',
  'runs.upload',
  'runs.manage',
  'votes.write',
  'decisions.reconcile',
  'calibration.manage',
  'agreement.read',
  'releases.read',
  'releases.create',
  'exports.download',
  'denoise.request',
  'users.manage',
  'invitations.create',
  'audit.read',
  'storage.read',
  'mailbox.read',
] as const;
export type Action = (typeof ACTIONS)[number];

const everyone: Action[] = ['account.read', 'account.update'];
const reader: Action[] = [...everyone, 'tokens.manage', 'studies.read', 'runs.read', 'agreement.read', 'releases.read', 'exports.download'];

export const PERMISSIONS: Record<Role, ReadonlySet<Action>> = {
  admin: new Set<Action>(ACTIONS),
  lead: new Set<Action>([
    ...reader,
    'studies.create',
    'studies.update',
    'runs.upload',
    'runs.manage',
    'decisions.reconcile',
    'calibration.manage',
    'releases.create',
    'denoise.request',
    'invitations.create',
  ]),
  rater: new Set<Action>([...everyone, 'studies.read', 'runs.read', 'votes.write']),
  observer: new Set<Action>(reader),
};

export function can(role: Role, action: Action): boolean {
  return PERMISSIONS[role]?.has(action) ?? false;
}

/** Study-level rule: the caller leads this study (or is an admin), so may change it, reconcile, run its calibration set and release. */
export function leadsStudy(access: Access | null): boolean {
  return !!access && (access.isAdmin || access.studyRole === 'lead');
}

/** Study-level rule: the caller manages this study's runs and protocol — an admin, or a member leading it who also holds the facility role lead. */
export function managesStudy({ role, studyRole }: { role: Role; studyRole: StudyRole | null }): boolean {
  return role === 'admin' || (studyRole === 'lead' && role === 'lead');
}

/** Study-level rule: the caller sees every run of this study (admins, its leads and observers); raters see only the runs assigned to them. */
export function seesAllRuns(access: Access): boolean {
  return access.isAdmin || access.studyRole === 'lead' || access.studyRole === 'observer';
}

/** Account roles that may vote (votes.write): the only accounts automatic or manual assignment may choose as raters. */
export const VOTING_ROLES: readonly Role[] = (Object.keys(PERMISSIONS) as Role[]).filter((r) => can(r, 'votes.write'));
