/**
 * Overdue work: assignments past their due date (due_at < now) and not submitted, on ready runs,
 * with the rater's progress (labelled components of the current decomposition / total). The daily
 * job (notify-overdue) sends each active lead of a study with overdue work one summary covering
 * all their studies.
 */
import type { Knex } from 'knex';
import { bidsName } from '@/lib/bids';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { deliverMail } from '@/lib/mail/deliver';
import { overdueSummaryMail, type OverdueStudy } from '@/lib/mail/templates/overdue-summary';

export type OverdueAssignment = {
  assignmentId: number;
  runId: number;
  studyId: number;
  studyName: string;
  runName: string;
  raterId: number;
  raterName: string;
  dueAt: Date;
  labelled: number;
  total: number;
};

/** Overdue assignments, optionally of one study, oldest due first. */
export async function listOverdue(db: Knex, { studyId }: { studyId?: number } = {}): Promise<OverdueAssignment[]> {
  const q = db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('studies as s', 's.id', 'r.study_id')
    .join('users as u', 'u.id', 'a.rater_id')
    .where('r.status', 'ready')
    .whereNull('a.submitted_at')
    .whereNotNull('a.due_at')
    .where('a.due_at', '<', db.raw('NOW(3)'))
    .select(
      'a.id as assignmentId',
      'r.id as runId',
      's.id as studyId',
      's.name as studyName',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'u.id as raterId',
      'u.name as raterName',
      'a.due_at as dueAt',
      db.raw(
        `(SELECT COUNT(*) FROM votes v JOIN components c ON c.id = v.component_id JOIN decompositions d ON d.id = c.decomposition_id AND d.is_current = 1
          WHERE d.run_id = r.id AND v.rater_id = a.rater_id) as labelled`,
      ),
      db.raw('(SELECT d.k FROM decompositions d WHERE d.run_id = r.id AND d.is_current = 1 LIMIT 1) as total'),
    )
    .orderBy([{ column: 'a.due_at' }, { column: 'r.id' }, { column: 'u.name' }]);
  if (studyId) q.where('s.id', studyId);
  const rows = await q;
  return rows.map((r) => ({
    assignmentId: Number(r.assignmentId),
    runId: Number(r.runId),
    studyId: Number(r.studyId),
    studyName: r.studyName,
    runName: bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel }),
    raterId: Number(r.raterId),
    raterName: r.raterName,
    dueAt: new Date(r.dueAt),
    labelled: Number(r.labelled ?? 0),
    total: Number(r.total ?? 0),
  }));
}

export type OverdueSummaryResult = { sent: Array<{ leadId: number; assignments: number }>; failed: number };

/** One summary e-mail per active lead of every study with overdue work. */
export async function sendOverdueSummaries(db: Knex): Promise<OverdueSummaryResult> {
  const overdue = await listOverdue(db);
  const result: OverdueSummaryResult = { sent: [], failed: 0 };
  if (!overdue.length) return result;
  const leads = await db('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .whereIn('m.study_id', [...new Set(overdue.map((o) => o.studyId))])
    .where({ 'm.study_role': 'lead', 'u.active': true })
    .select('m.study_id as studyId', 'u.id', 'u.email', 'u.name');
  const facility = facilityName();
  const base = publicBaseUrl();
  const byLead = new Map<number, { email: string; name: string; studyIds: number[] }>();
  for (const l of leads) {
    const e = byLead.get(Number(l.id)) ?? { email: l.email as string, name: l.name as string, studyIds: [] as number[] };
    e.studyIds.push(Number(l.studyId));
    byLead.set(Number(l.id), e);
  }
  for (const [leadId, lead] of byLead) {
    const studies: OverdueStudy[] = [];
    for (const studyId of lead.studyIds) {
      const lines = overdue.filter((o) => o.studyId === studyId);
      if (lines.length) studies.push({ studyName: lines[0]!.studyName, url: `${base}/studies/${studyId}/assignments`, lines });
    }
    const content = overdueSummaryMail({ facility, name: lead.name, studies });
    if (await deliverMail({ to: lead.email, content, template: 'overdue-summary' })) {
      result.sent.push({ leadId, assignments: studies.reduce((s, x) => s + x.lines.length, 0) });
    } else result.failed++;
  }
  return result;
}
