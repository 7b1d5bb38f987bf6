// The one permission module (lib/auth/permissions.ts): the role → action matrix and the named
// study-level rules every route and page uses. The matrix is the product's own rule (DESIGN.md),
// no outside source.
import { describe, expect, it } from 'vitest';
import { ACTIONS, can, leadsStudy, managesStudy, PERMISSIONS } from '@/lib/auth/permissions';
import type { Access } from '@/lib/vocabulary/roles';
import { ROLES } from '@/lib/vocabulary/roles';

const access = (over: Partial<Access>): Access => ({ studyId: 1, name: 'Study', studyRole: null, isAdmin: false, ...over });

describe('role → action matrix', () => {
  it('grants every action to some role, and everything to the admin', () => {
    for (const action of ACTIONS)
      expect(
        ROLES.some((r) => can(r, action)),
        action,
      ).toBe(true);
    expect([...PERMISSIONS.admin].sort()).toEqual([...ACTIONS].sort());
  });

  it('gives calibration its own action: admins and leads, not raters or observers', () => {
    expect(ROLES.filter((r) => can(r, 'calibration.manage')).sort()).toEqual(['admin', 'lead']);
  });
});

describe('study-level rules', () => {
  it('leadsStudy: an admin, or a member whose study role is lead; nobody without access', () => {
    expect(leadsStudy(null)).toBe(false);
    expect(leadsStudy(access({ isAdmin: true }))).toBe(true);
    expect(leadsStudy(access({ studyRole: 'lead' }))).toBe(true);
    expect(leadsStudy(access({ studyRole: 'rater' }))).toBe(false);
    expect(leadsStudy(access({ studyRole: 'observer' }))).toBe(false);
  });

  it('managesStudy: an admin, or a study lead who also holds the facility role lead', () => {
    expect(managesStudy({ role: 'admin', studyRole: null })).toBe(true);
    expect(managesStudy({ role: 'lead', studyRole: 'lead' })).toBe(true);
    expect(managesStudy({ role: 'lead', studyRole: 'rater' })).toBe(false);
    expect(managesStudy({ role: 'rater', studyRole: 'lead' })).toBe(false);
  });
});
