/**
 * Drift e-mail: in a study with a calibration threshold, a rater who was certified (passed) but whose
 * score over their submitted calibration runs is now below the threshold is reported to each active
 * lead of the study, once per calibration submission (a row in `notifications`, kind
 * calibration.drift, payload { studyId, raterId, key } with key = the rater's latest calibration
 * submission). Raters with no submitted calibration run are not a drop and are not reported.
 * Runs inside the votes-complete check (lib/worker/kinds/notify-votes-complete.ts).
 */
import { isGated } from '@/lib/agreement/threshold-gate';
import { calibrationGate, calibrationThreshold } from '@/lib/db/queries/calibration-gate';
import {
  insertNotification,
  lastCalibrationSubmission,
  listActiveLeads,
  listCertifiedInThresholdStudies,
  listNotificationPayloads,
} from '@/lib/db/queries/notifications';
import type { Db } from '@/lib/db/transaction';
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

export async function sendDriftNotices(db: Db): Promise<{ sent: Array<{ leadId: number; raterId: number }>; failed: number }> {
  const result = { sent: [] as Array<{ leadId: number; raterId: number }>, failed: 0 };
  const certified = await listCertifiedInThresholdStudies(db);
  const facility = facilityName();
  const base = publicBaseUrl();
  for (const c of certified) {
    const studyId = Number(c.studyId),
      raterId = Number(c.raterId);
    if (!isGated(await calibrationThreshold({ studyId }, db))) continue;
    const last = await lastCalibrationSubmission(db, { studyId, raterId });
    if (!last) continue;
    const gate = await calibrationGate({ studyId, raterId }, db);
    if (gate.passes) continue;
    const key = `${raterId}:${last.toISOString()}`;
    const leads = await listActiveLeads(db, { studyIds: [studyId] });
    const done = await listNotificationPayloads(db, { kind: CALIBRATION_DRIFT_KIND, userIds: leads.map((l) => l.id) });
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
      await insertNotification(db, { userId: lead.id, kind: CALIBRATION_DRIFT_KIND, payload: { studyId, raterId, key } });
      result.sent.push({ leadId: Number(lead.id), raterId });
    }
  }
  return result;
}
