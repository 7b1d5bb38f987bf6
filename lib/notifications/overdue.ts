/**
 * Overdue work: assignments past their due date (due_at < now) and not submitted, on ready runs,
 * with the rater's progress (labelled components of the current decomposition / total). The daily
 * job (notify-overdue) sends each active lead of a study with overdue work one summary covering
 * all their studies.
 */
import { listActiveLeads } from '@/lib/db/queries/notifications';
import { listOverdue } from '@/lib/db/queries/overdue';
import type { Db } from '@/lib/db/transaction';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { deliverMail } from '@/lib/mail/deliver';
import { overdueSummaryMail, type OverdueStudy } from '@/lib/mail/templates/overdue-summary';

export type OverdueSummaryResult = { sent: Array<{ leadId: number; assignments: number }>; failed: number };

/** One summary e-mail per active lead of every study with overdue work. */
export async function sendOverdueSummaries(db: Db): Promise<OverdueSummaryResult> {
  const overdue = await listOverdue({}, db);
  const result: OverdueSummaryResult = { sent: [], failed: 0 };
  if (!overdue.length) return result;
  const leads = await listActiveLeads(db, { studyIds: [...new Set(overdue.map((o) => o.studyId))] });
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
