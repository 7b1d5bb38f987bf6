export const ROLES = ['admin', 'lead', 'rater', 'observer'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Facility admin',
  lead: 'Study lead',
  rater: 'Rater',
  observer: 'Observer',
};
