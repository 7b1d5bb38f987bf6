/**
 * The route wrapper owns the study scope (issue 12 item 2): with `scope: 'study' | 'run'` it loads
 * the caller's Access from the address's id — 404 when the caller may not see that study (a
 * non-member, or an id that does not exist: the same answer, so ids cannot be probed), 403 when
 * `studyRule: 'lead'` and the caller does not lead it — and hands the Access to the handler.
 * Against the real MariaDB and a real route (GET /api/studies/:id/agreement).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: async () => currentSession(),
}));

import { closeDb, db } from '@/lib/db/knex';
import { handler } from '@/lib/api/handler';
import * as agreementRoute from '@/app/api/studies/[id]/agreement/route';
import { addMember, createRun, createStudy, createUser } from './helpers/factories';

let studyId = 0;
let runId = 0;
const people: Record<'lead' | 'rater' | 'outsider' | 'admin', number> = { lead: 0, rater: 0, outsider: 0, admin: 0 };

beforeAll(async () => {
  people.lead = await createUser(db, { role: 'lead' });
  people.rater = await createUser(db, { role: 'rater' });
  people.outsider = await createUser(db, { role: 'lead' });
  people.admin = await createUser(db, { role: 'admin' });
  studyId = await createStudy(db, { createdBy: people.lead });
  await addMember(db, { studyId, userId: people.lead, studyRole: 'lead' });
  await addMember(db, { studyId, userId: people.rater, studyRole: 'rater' });
  runId = await createRun(db, {
    studyId,
    createdBy: people.lead,
    file: { fileKey: `runs/scope-test-${studyId}.nii.gz`, sha256: `${studyId}`.padStart(64, '0'), sizeBytes: 1 },
  });
});

afterAll(async () => {
  actAs(null);
  await closeDb();
});

const params = z.object({ id: z.coerce.number().int().positive() });
const leadsOnly = handler(
  { permission: 'runs.read', scope: 'run', studyRule: 'lead', denied: 'looking at this as a non-lead', params },
  async ({ access }) => ({
    studyId: access.studyId,
    runId: access.runId,
    studyRole: access.studyRole,
  }),
);

describe('scope: study', () => {
  it('a member gets the study; a non-member and a missing id get the same 404', async () => {
    actAs(people.lead);
    const ok = await callRoute(agreementRoute.GET, { url: `/api/studies/${studyId}/agreement`, params: { id: String(studyId) } });
    expect(ok.status).toBe(200);
    expect(ok.json.study.id).toBe(studyId);
    actAs(people.outsider);
    const foreign = await callRoute(agreementRoute.GET, { url: `/api/studies/${studyId}/agreement`, params: { id: String(studyId) } });
    const missing = await callRoute(agreementRoute.GET, { url: '/api/studies/999999999/agreement', params: { id: '999999999' } });
    expect(foreign.status).toBe(404);
    expect(missing.status).toBe(404);
    expect(foreign.json.error.message).toBe(missing.json.error.message);
  });
});

describe('scope: run, lead rule', () => {
  it('passes the lead and an admin with the run’s study, refuses a rater with 403 and an outsider with 404', async () => {
    actAs(people.lead);
    const lead = await callRoute(leadsOnly, { url: `/api/runs/${runId}/x`, params: { id: String(runId) } });
    expect(lead.status).toBe(200);
    expect(lead.json).toEqual({ studyId, runId, studyRole: 'lead' });
    actAs(people.admin);
    expect((await callRoute(leadsOnly, { url: `/api/runs/${runId}/x`, params: { id: String(runId) } })).json).toEqual({
      studyId,
      runId,
      studyRole: null,
    });
    actAs(people.rater);
    const rater = await callRoute(leadsOnly, { url: `/api/runs/${runId}/x`, params: { id: String(runId) } });
    expect(rater.status).toBe(403);
    expect(rater.json.error.message).toMatch(/looking at this as a non-lead/);
    actAs(people.outsider);
    expect((await callRoute(leadsOnly, { url: `/api/runs/${runId}/x`, params: { id: String(runId) } })).status).toBe(404);
  });
});
