/**
 * Set-up for tests/e2e/calibration-walk.spec.ts, run in a child process against the browser tests'
 * database (QUORUM_DB_NAME, files under QUORUM_UPLOADS_DIR):
 *   node --import tsx tests/e2e/helpers/walkthrough-studies.ts calibration|suggestions
 * prints the ids as JSON. Each makes its own study, so its threshold or model touches no other test.
 *
 * calibration: a study with the threshold AC1 ≥ 0.8 and noise sensitivity ≥ 0.85 on the set
 *   "Autumn reference set": one calibration run (6 components; reference = the lead's reconciled
 *   decisions with reasons: components 1 and 4 noise of kind motion, the rest signal) assigned to a
 *   new rater account, and one live ready run nobody of the new rater's holds.
 * suggestions: a study (consensus rule unanimous) with three released runs of subjects s1–s3
 *   (invented labels, as in tests/integration/suggestions-flow.test.ts) to learn from, and a fourth
 *   run assigned to rater1, rater2 and rater3, who vote through the desk API in the test.
 */
import { createDb, parseJson, toJson } from '@/lib/db/knex';
import { resolveDbSettings } from '@/lib/db/config';
import { createReadyRun } from './ready-run';

const REASONS = {
  noise: 'Rim at the brain edge that follows the motion trace',
  signal: 'Grey-matter network with a slow time course',
} as const;
const REFERENCE = ['noise', 'signal', 'signal', 'noise', 'signal', 'signal'] as const;

async function main() {
  const which = process.argv[2];
  const settings = resolveDbSettings();
  if (!/e2e|test/.test(settings.database)) throw new Error(`refusing to write test studies into ${settings.database}`);
  const db = createDb(settings);
  try {
    const ids: Record<string, number> = Object.fromEntries(
      (await db('users').select('id', 'email')).map((u: { id: number; email: string }) => [u.email.split('@')[0], u.id]),
    );
    const stamp = Date.now().toString(36);
    if (which === 'calibration') {
      const hash = (await db('users').where({ id: ids.rater1 }).first('password_hash')).password_hash;
      const email = `newrater-${stamp}@fernhollow.example`;
      const [newRater] = await db('users').insert({ email, name: 'Mila Korhonen', role: 'rater', active: true, password_hash: hash });
      const [studyId] = await db('studies').insert({
        name: `Calibration walk ${stamp}`,
        created_by: ids.lead,
        raters_per_run: 1,
        consensus_rule: 'majority',
        label_set: toJson(['signal', 'noise', 'uncertain']),
        noise_kinds: toJson(['motion', 'other']),
        calibration_min_ac1: 0.8,
        calibration_min_sensitivity: 0.85,
        calibration_set_name: 'Autumn reference set',
      });
      for (const [id, role] of [
        [ids.lead, 'lead'],
        [ids.rater1, 'rater'],
        [newRater, 'rater'],
      ] as const)
        await db('study_members').insert({ study_id: studyId, user_id: id, study_role: role });
      const cal = await createReadyRun(db, {
        studyId,
        createdBy: ids.lead!,
        raterIds: [newRater],
        size: 'tiny',
        seed: 61,
        sub: `cal${stamp}`,
        components: REFERENCE.length,
        restarts: 1,
      });
      await db('runs').where({ id: cal.runId }).update({ is_calibration: true });
      for (const [i, componentId] of cal.componentIds.entries()) {
        const label = REFERENCE[i]!;
        const kind = label === 'noise' ? 'motion' : null;
        await db('decisions').insert({
          component_id: componentId,
          run_id: cal.runId,
          label,
          noise_kind: kind,
          method: 'reconciled',
          reason: REASONS[label],
          decided_by: ids.lead,
        });
        await db('reference_labels').insert({ component_id: componentId, label, noise_kind: kind, set_by: ids.lead });
      }
      const live = await createReadyRun(db, {
        studyId,
        createdBy: ids.lead!,
        raterIds: [ids.rater1!],
        size: 'tiny',
        seed: 62,
        sub: `live${stamp}`,
        components: 4,
        restarts: 1,
      });
      process.stdout.write(
        JSON.stringify({ studyId, email, newRaterId: Number(newRater), calibrationRunId: cal.runId, liveRunId: live.runId, k: cal.k }),
      );
    } else if (which === 'suggestions') {
      const [studyId] = await db('studies').insert({
        name: `Suggestions walk ${stamp}`,
        created_by: ids.lead,
        raters_per_run: 3,
        consensus_rule: 'unanimous',
        label_set: toJson(['signal', 'noise', 'uncertain']),
        noise_kinds: toJson(['motion', 'other']),
      });
      for (const [id, role] of [
        [ids.lead, 'lead'],
        [ids.rater1, 'rater'],
        [ids.rater2, 'rater'],
        [ids.rater3, 'rater'],
      ] as const)
        await db('study_members').insert({ study_id: studyId, user_id: id, study_role: role });
      const runs = [];
      for (const [i, sub] of ['s1', 's2', 's3', 's4'].entries()) {
        runs.push(
          await createReadyRun(db, {
            studyId,
            createdBy: ids.lead!,
            raterIds: i === 3 ? [ids.rater1!, ids.rater2!, ids.rater3!] : [],
            size: 'tiny',
            seed: 71 + i,
            sub: `${sub}${stamp}`,
            components: 8,
            restarts: 1,
          }),
        );
      }
      const [releaseId] = await db('releases').insert({ study_id: studyId, run_id: null, version: 1, released_by: ids.lead });
      for (const r of runs.slice(0, 3)) {
        const comps = await db('components').where({ decomposition_id: r.decompositionId }).orderBy('idx').select('id', 'idx', 'features');
        await db('release_decisions').insert(
          comps.map((c: { id: number; idx: number; features: unknown }, j: number) => {
            const hf = (parseJson<{ highFrequencyPower: number }>(c.features) ?? { highFrequencyPower: 0 }).highFrequencyPower;
            return {
              release_id: releaseId,
              component_id: c.id,
              run_id: r.runId,
              idx: c.idx,
              label: hf > 0.3 || j % 3 === 1 ? 'noise' : 'signal',
              method: 'override',
            };
          }),
        );
      }
      const live = runs[3]!;
      process.stdout.write(JSON.stringify({ studyId, liveRunId: live.runId, componentIds: live.componentIds, k: live.k }));
    } else {
      throw new Error(`unknown set-up "${which}" (calibration or suggestions)`);
    }
  } finally {
    await db.destroy();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
