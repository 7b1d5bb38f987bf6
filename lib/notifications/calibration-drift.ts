/**
 * Drift e-mail: in a study with a calibration threshold, a rater who was certified (passed) but whose
 * score over their submitted calibration runs is now below the threshold is reported to each active
 * lead of the study, once per calibration submission (a row in `notifications`, kind
 * calibration.drift, payload { studyId, raterId, key } with key = the rater's latest calibration
 * submission). Raters with no submitted calibration run are not a drop and are not reported.
 * Runs inside the votes-complete check (lib/worker/kinds/notify-votes-complete.ts).
 */
import type { Knex } from 'knex';
import { isGated } from '@/lib/agreement/threshold-gate';
import { calibrationGate, calibrationThreshold } from '@/lib/db/queries/calibration-gate';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { deliverMail } from '@/lib/mail/deliver';
import { calibrationDriftMail } from '@/lib/mail/templates/calibration-drift';

export const CALIBRATION_DRIFT_KIND = 'calibration.drift';

/** The key of a stored notification payload (a JSON column arrives as text or parsed). */
function keyOf(payload: unknown): string {
  try {
    const p = typeof payload === 'string' ? (JSON.parse(payload) as { key?: string }) : (payload as { key?: string } | null);
    return p?.key ?? '';
  } catch {
    return '';
  }
}

export async function sendDriftNotices(db: Knex): Promise<{ sent: Array<{ leadId: number; raterId: number }>; failed: number }> {
  const result = { sent: [] as Array<{ leadId: number; raterId: number }>, failed: 0 };
  const certified = await db('rater_certifications as rc')
    .join('users as u', 'u.id', 'rc.user_id')
    .join('studies as s', 's.id', 'rc.study_id')
    .where({ 'rc.passed': true, 'u.active': true })
    .where((q) => q.whereNotNull('s.calibration_min_ac1').orWhereNotNull('s.calibration_min_sensitivity'))
    .select('rc.study_id as studyId', 'rc.user_id as raterId', 'u.name as raterName', 's.name as studyName');
  const facility = facilityName();
  const base = publicBaseUrl();
  for (const c of certified) {
    const studyId = Number(c.studyId),
      raterId = Number(c.raterId);
    if (!isGated(await calibrationThreshold({ studyId }, db))) continue;
    const last = await db('assignments as a')
      .join('runs as r', 'r.id', 'a.run_id')
      .where({ 'a.rater_id': raterId, 'r.study_id': studyId, 'r.is_calibration': true })
      .whereNotNull('a.submitted_at')
      .max({ at: 'a.submitted_at' })
      .first();
    if (!last?.at) continue;
    const gate = await calibrationGate({ studyId, raterId }, db);
    if (gate.passes) continue;
    const key = `${raterId}:${new Date(last.at).toISOString()}`;
    const leads = await db('study_members as m')
      .join('users as u', 'u.id', 'm.user_id')
      .where({ 'm.study_id': studyId, 'm.study_role': 'lead', 'u.active': true })
      .select('u.id', 'u.email', 'u.name');
    const done = await db('notifications')
      .where({ kind: CALIBRATION_DRIFT_KIND })
      .whereIn('user_id', leads.map((l) => l.id).concat(0))
      .select('user_id', 'payload');
    const seen = new Set(done.map((d) => `${d.user_id}|${keyOf(d.payload)}`));
    for (const lead of leads) {
      if (seen.has(`${lead.id}|${key}`)) continue;
      const content = calibrationDriftMail({
        facility,
        name: lead.name,
        studyName: c.studyName,
        raterName: c.raterName,
        reason: gate.reason ?? 'the score is below the threshold',
        url: `${base}/studies/${studyId}/calibration`,
      });
      if (!(await deliverMail({ to: lead.email, content, template: 'calibration-drift' }))) {
        result.failed++;
        continue;
      }
      await db('notifications').insert({
        user_id: lead.id,
        kind: CALIBRATION_DRIFT_KIND,
        payload: JSON.stringify({ studyId, raterId, key }),
      });
      result.sent.push({ leadId: Number(lead.id), raterId });
    }
  }
  return result;
}
