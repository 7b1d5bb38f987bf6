/**
 * Marks assignments submitted the way POST /api/runs/:id/submit does (lib/db/queries/desk.ts
 * submitRun) for tests that write votes straight into the database: submitted_at and
 * first_submitted_at set, and the rater's votes copied to submitted_votes (the votes as first
 * submitted, which agreement statistics read).
 */
import type { Knex } from 'knex';

export async function markSubmitted(db: Knex, { runId, raterId }: { runId: number; raterId?: number }): Promise<void> {
  const now = new Date();
  const q = db('assignments').where({ run_id: runId });
  if (raterId) q.andWhere({ rater_id: raterId });
  await q.update({ submitted_at: now, first_submitted_at: db.raw('COALESCE(first_submitted_at, ?)', [now]) });
  await db.raw(
    `INSERT INTO submitted_votes (component_id, run_id, rater_id, label, noise_kind, confidence, note, submitted_at)
     SELECT v.component_id, v.run_id, v.rater_id, v.label, v.noise_kind, v.confidence, v.note, ?
     FROM votes v WHERE v.run_id = ? ${raterId ? 'AND v.rater_id = ?' : ''}
     ON DUPLICATE KEY UPDATE submitted_votes.id = submitted_votes.id`,
    raterId ? [now, runId, raterId] : [now, runId],
  );
}
