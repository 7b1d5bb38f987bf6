/** The role vocabulary: facility (account) roles, study roles, and what a caller is in one study. A leaf: imports nothing. */
export const ROLES = ['admin', 'lead', 'rater', 'observer'] as const;
export type Role = (typeof ROLES)[number];

/** A member's role within one study (study_members.study_role). */
export const STUDY_ROLES = ['lead', 'rater', 'observer'] as const;
export type StudyRole = (typeof STUDY_ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Facility admin',
  lead: 'Study lead',
  rater: 'Rater',
  observer: 'Observer',
};

/**
 * Which account (facility) roles may hold a study role — the one membership rule, for adding a
 * member, inviting, and choosing raters: raters vote (rater and admin accounts), leads manage
 * (lead and admin accounts), anyone may observe.
 */
export const STUDY_ROLE_ACCOUNTS: Record<StudyRole, readonly Role[]> = {
  lead: ['lead', 'admin'],
  rater: ['rater', 'admin'],
  observer: ['admin', 'lead', 'rater', 'observer'],
};

export function mayHoldStudyRole(role: Role, studyRole: StudyRole): boolean {
  return STUDY_ROLE_ACCOUNTS[studyRole].includes(role);
}

/** Why an account role cannot hold a study role, in words an inviting lead can act on. */
export function studyRoleRefusal(role: Role, studyRole: StudyRole): string {
  const allowed = STUDY_ROLE_ACCOUNTS[studyRole].map((r) => ROLE_LABELS[r].toLowerCase()).join(' or ');
  const name = ROLE_LABELS[role].toLowerCase();
  return `${/^[aeiou]/.test(name) ? 'An' : 'A'} ${name} account cannot be a study ${studyRole}${studyRole === 'rater' ? ' (it cannot vote)' : ''}: choose the facility role ${allowed}, or another role in the study.`;
}

/**
 * The caller's access to one study (lib/db/queries/study-access.ts#findStudyAccess): null when
 * they may not see it. Admins see every study; everyone else only studies they are a member of.
 */
export type Access = { studyId: number; name: string; studyRole: StudyRole | null; isAdmin: boolean };
