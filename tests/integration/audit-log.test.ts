/**
 * The audit log against the real MariaDB: every entry has actor, action, target and time; filters
 * by actor, action (or action family), study and UTC date range; paging; the batched iterator of
 * the CSV export returns every match once; the query modules offer no way to change or delete.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomBytes } from 'node:crypto';
import { db } from '@/lib/db/knex';
import * as auditModule from '@/lib/db/queries/audit';
import * as auditLogModule from '@/lib/db/queries/audit-log';
import { iterateAuditLog, queryAuditLog } from '@/lib/db/queries/audit-log';
import { recordAudit } from '@/lib/db/queries/audit';
import { auditFilterSchema, auditPageSchema } from '@/lib/audit/schema';

const tag = randomBytes(3).toString('hex');
let actorA: number;
let actorB: number;
let studyId: number;

beforeAll(async () => {
  const [a] = await db('users').insert({ email: `audit-a-${tag}@fernhollow.example`, name: `Auditor A ${tag}`, role: 'admin' });
  const [b] = await db('users').insert({ email: `audit-b-${tag}@fernhollow.example`, name: `Auditor B ${tag}`, role: 'lead' });
  actorA = Number(a);
  actorB = Number(b);
  const [s] = await db('studies').insert({ name: `Audit study ${tag}`, created_by: actorA, label_set: '[]', noise_kinds: '[]' });
  studyId = Number(s);
  // 30 entries by A in the study, 5 by B without a study, two on fixed dates
  for (let i = 0; i < 30; i++)
    await recordAudit({
      actorId: actorA,
      action: i % 2 ? 'user.role_changed' : 'user.deactivated',
      targetType: 'user',
      targetId: i,
      studyId,
    });
  for (let i = 0; i < 5; i++)
    await recordAudit({
      actorId: actorB,
      action: 'invitation.sent',
      targetType: 'invitation',
      targetId: 1000 + i,
      detail: { email: `x${i}@fernhollow.example` },
    });
  await db('audit_log').insert({
    actor_id: actorB,
    action: 'release.create',
    target_type: 'release',
    target_id: 'r1',
    created_at: new Date('2026-03-10T23:59:59.000Z'),
  });
  await db('audit_log').insert({
    actor_id: actorB,
    action: 'release.create',
    target_type: 'release',
    target_id: 'r2',
    created_at: new Date('2026-03-11T00:00:00.000Z'),
  });
});

afterAll(async () => {
  await db.destroy();
});

describe('audit log', () => {
  it('every entry has actor, action, target and time', async () => {
    const { entries } = await queryAuditLog({ filter: { actorId: actorB }, page: 1, pageSize: 50 });
    expect(entries).toHaveLength(7);
    for (const e of entries) {
      expect(e.actorName).toBe(`Auditor B ${tag}`);
      expect(e.action).toMatch(/^[a-z_]+\.[a-z_]+$/);
      expect(e.targetType).toBeTruthy();
      expect(e.targetId).toBeTruthy();
      expect(e.createdAt).toBeInstanceOf(Date);
    }
    expect(entries.find((e) => e.targetId === '1003')?.detail).toEqual({ email: 'x3@fernhollow.example' });
  });

  it('filters by actor, study, action and action family, newest first, with paging', async () => {
    const page1 = await queryAuditLog({ filter: { actorId: actorA, studyId }, page: 1, pageSize: 20 });
    expect(page1.total).toBe(30);
    expect(page1.entries).toHaveLength(20);
    const page2 = await queryAuditLog({ filter: { actorId: actorA, studyId }, page: 2, pageSize: 20 });
    expect(page2.entries).toHaveLength(10);
    const ids = [...page1.entries, ...page2.entries].map((e) => e.id);
    expect(new Set(ids).size).toBe(30);
    expect([...ids].sort((x, y) => y - x)).toEqual(ids);
    expect(page1.entries[0].studyName).toBe(`Audit study ${tag}`);

    expect((await queryAuditLog({ filter: { actorId: actorA, action: 'user.role_changed' }, page: 1, pageSize: 50 })).total).toBe(15);
    expect((await queryAuditLog({ filter: { actorId: actorA, action: 'user' }, page: 1, pageSize: 50 })).total).toBe(30);
    expect((await queryAuditLog({ filter: { actorId: actorA, action: 'use' }, page: 1, pageSize: 50 })).total).toBe(0);
  });

  it('filters by an inclusive UTC date range', async () => {
    const day = async (from?: string, to?: string) =>
      (await queryAuditLog({ filter: { actorId: actorB, action: 'release', from, to }, page: 1, pageSize: 50 })).entries.map(
        (e) => e.targetId,
      );
    expect(await day('2026-03-10', '2026-03-10')).toEqual(['r1']);
    expect(await day('2026-03-11', '2026-03-11')).toEqual(['r2']);
    expect(await day('2026-03-10', '2026-03-11')).toEqual(['r2', 'r1']);
    expect(await day(undefined, '2026-03-09')).toEqual([]);
  });

  it('the export iterator yields every match once across batches', async () => {
    const seen: number[] = [];
    for await (const row of iterateAuditLog({ filter: { actorId: actorA }, batch: 7 })) seen.push(row.id);
    expect(seen).toHaveLength(30);
    expect(new Set(seen).size).toBe(30);
  });

  it('the filter schema checks its input', () => {
    expect(auditFilterSchema.safeParse({ from: '2026-03-12', to: '2026-03-11' }).success).toBe(false);
    expect(auditFilterSchema.safeParse({ from: 'yesterday' }).success).toBe(false);
    expect(auditFilterSchema.safeParse({ action: "x' OR 1=1" }).success).toBe(false);
    expect(auditPageSchema.parse({ actorId: '', page: '2' })).toMatchObject({ actorId: undefined, page: 2, pageSize: 50 });
    expect(auditPageSchema.safeParse({ pageSize: '5000' }).success).toBe(false);
  });

  it('offers no update or delete', () => {
    const names = [...Object.keys(auditModule), ...Object.keys(auditLogModule)];
    expect(names.filter((n) => /update|delete|remove|edit|purge/i.test(n))).toEqual([]);
  });
});
