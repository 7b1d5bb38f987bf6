/**
 * CLI for the browser tests: `node --import tsx tests/e2e/helpers/create-ready-run.ts '<json>'`
 * with {"raters": ["rater1@…"], "size": "small", "seed": 7} creates a ready run in the demo study
 * of the database named by QUORUM_DB_NAME (files under QUORUM_UPLOADS_DIR) and prints
 * {"runId", "componentIds", "k"} as JSON.
 */
import { createDb } from '@/lib/db/knex';
import { resolveDbSettings } from '@/lib/db/config';
import { createReadyRun } from './ready-run';
import type { PhantomSize } from '@/lib/phantom';

async function main() {
  const args = JSON.parse(process.argv[2] ?? '{}') as {
    raters?: string[];
    size?: PhantomSize;
    seed?: number;
    components?: number;
    withMotion?: boolean;
    reproducibility?: number[];
    restarts?: number;
  };
  const settings = resolveDbSettings();
  if (!/e2e|test/.test(settings.database)) throw new Error(`refusing to write test runs into ${settings.database}`);
  const db = createDb(settings);
  try {
    const study = await db('studies')
      .where({ slug: 'evening-light-sleep-rest' })
      .first('id')
      .then((s) => s ?? db('studies').orderBy('id').first('id'));
    const lead = await db('users').where({ email: 'lead@fernhollow.example' }).first('id');
    const raters = await db('users')
      .whereIn('email', args.raters ?? ['rater1@fernhollow.example', 'rater2@fernhollow.example'])
      .select('id');
    const run = await createReadyRun(db, {
      studyId: study.id,
      createdBy: lead.id,
      raterIds: raters.map((r: { id: number }) => r.id),
      size: args.size ?? 'small',
      seed: args.seed ?? 7,
      components: args.components,
      withMotion: args.withMotion,
      reproducibility: args.reproducibility,
      restarts: args.restarts,
    });
    process.stdout.write(JSON.stringify(run) + '\n');
  } finally {
    await db.destroy();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
