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
