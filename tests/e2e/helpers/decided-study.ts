import { execFileSync } from 'node:child_process';
import path from 'node:path';

/**
 * A fresh study (led by the demo lead, with rater1, rater2 and the observer) with one tiny ready
 * run whose components all have votes from two submitted raters and final decisions: ready to
 * release. Runs in a child process against the browser tests' database. Returns the study id.
 */
export function createDecidedStudy(name: string, sub = 'wk01'): number {
  const out = execFileSync(
    'node',
    [
      '--import',
      'tsx',
      '-e',
      `
    Promise.all([import('./lib/db/knex.ts'), import('./tests/e2e/helpers/ready-run.ts'), import('./tests/integration/helpers/submitted.ts')]).then(async ([{ createDb }, { createReadyRun }, { markSubmitted }]) => {
      const db = createDb();
      const ids = Object.fromEntries((await db('users').select('id', 'email')).map((u) => [u.email.split('@')[0], u.id]));
      const [studyId] = await db('studies').insert({ name: ${JSON.stringify(name)} + ' ' + Date.now(), created_by: ids.lead, raters_per_run: 2, consensus_rule: 'majority',
        label_set: JSON.stringify(['signal', 'noise', 'uncertain']), noise_kinds: JSON.stringify(['motion', 'other']) });
      for (const [who, role] of [['lead', 'lead'], ['rater1', 'rater'], ['rater2', 'rater'], ['observer', 'observer']]) await db('study_members').insert({ study_id: studyId, user_id: ids[who], study_role: role });
      const run = await createReadyRun(db, { studyId, createdBy: ids.lead, raterIds: [ids.rater1, ids.rater2], size: 'tiny', seed: 23, sub: ${JSON.stringify(sub)}, components: 6 });
      for (const [n, componentId] of run.componentIds.entries()) {
        const label = n % 3 === 2 ? 'noise' : 'signal';
        for (const r of ['rater1', 'rater2']) await db('votes').insert({ component_id: componentId, run_id: run.runId, rater_id: ids[r], label, noise_kind: label === 'noise' ? 'motion' : null });
        await db('decisions').insert({ component_id: componentId, run_id: run.runId, label, noise_kind: label === 'noise' ? 'motion' : null, method: 'unanimous' });
      }
      await markSubmitted(db, { runId: run.runId }); // as the desk's submit does: agreement reads the votes as first submitted
      process.stdout.write(JSON.stringify({ studyId }));
      await db.destroy();
    });`,
    ],
    {
      env: {
        ...process.env,
        QUORUM_DB_NAME: process.env.QUORUM_DB_NAME ?? 'quorum_e2e',
        QUORUM_UPLOADS_DIR: process.env.QUORUM_UPLOADS_DIR ?? path.resolve('.data/e2e-uploads'),
      },
      encoding: 'utf8',
    },
  );
  return JSON.parse(out).studyId;
}
