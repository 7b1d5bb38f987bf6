// Puts the demo's synthetic runs into the demo study, through the same upload code a lead's
// browser uses (validation, checksums, storage keys, motion tables), and queues their
// decompositions for the worker. Idempotent: a study that already has runs is left alone.
// Usage: node --conditions=react-server --import tsx scripts/import-demo-runs.ts [--runs 6] [--size S]
// Default: six S-size runs of the realistic phantom (64 × 64 × 36, 300 volumes, 27 sources), so a
// newcomer rates realistic components; --size small --runs 12 gives the quick toy demo.
import { execFileSync } from 'node:child_process';
import { createReadStream, existsSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import { parseArgs } from 'node:util';
import { closeDb, db } from '@/lib/db/knex';
import { parseBidsName } from '@/lib/bids';
import { attachMotion, uploadRun } from '@/lib/runs/upload';
import { queueRun } from '@/lib/runs/actions';

const DEMO_STUDY_SLUG = 'evening-light-sleep-rest';
const DEMO_LEAD = 'lead@fernhollow.example';

const raw = (file: string) => ({
  body: Readable.toWeb(createReadStream(file)) as ReadableStream<Uint8Array>,
  contentLength: statSync(file).size,
});

async function main(): Promise<number> {
  const { values } = parseArgs({ options: { runs: { type: 'string', default: '6' }, size: { type: 'string', default: 'S' } } });
  const study = await db('studies').where({ slug: DEMO_STUDY_SLUG }).first('id');
  const lead = await db('users').where({ email: DEMO_LEAD }).first('id', 'role');
  if (!study || !lead) {
    console.error('import-demo-runs: the demo study or its lead is missing; run `npm run seed` first');
    return 1;
  }
  const [{ n }] = await db('runs').where({ study_id: study.id }).count({ n: '*' });
  if (Number(n) > 0) {
    console.log(`demo study already has ${n} runs; nothing imported`);
    return 0;
  }
  const dir = path.resolve('.data/demo-runs', `${values.size}-${values.runs}`);
  if (!existsSync(path.join(dir, 'dataset_description.json'))) {
    console.log(`writing ${values.runs} synthetic ${values.size} runs to ${dir}`);
    execFileSync(
      'node',
      ['--import', 'tsx', 'scripts/make-demo-data.ts', '--out', dir, '--size', String(values.size), '--runs', String(values.runs)],
      { stdio: ['ignore', 'ignore', 'inherit'] },
    );
  }
  const user = { id: Number(lead.id), role: lead.role };
  const runs = readdirSync(dir)
    .filter((f) => f.endsWith('_bold.nii.gz'))
    .sort();
  for (const name of runs) {
    const entities = parseBidsName(name);
    if (!entities) continue;
    const query = {
      name,
      sub: entities.sub,
      ses: entities.ses ?? '',
      task: entities.task ?? '',
      acq: entities.acq ?? '',
      run: entities.runLabel ?? '',
      queue: false,
    };
    const run = await uploadRun({ user, studyId: Number(study.id), query, raw: raw(path.join(dir, name)) });
    const motion = path.join(dir, name.replace('_bold.nii.gz', '_desc-motion_timeseries.tsv'));
    if (existsSync(motion)) {
      await attachMotion({
        user,
        runId: run.id,
        query: { name: path.basename(motion), order: 'trans-first', units: 'radians' },
        raw: raw(motion),
      });
    }
    await queueRun({ user, runId: run.id });
    console.log(`imported ${name} as run ${run.id} (queued)`);
  }
  return 0;
}

main()
  .then(async (code) => {
    await closeDb();
    process.exit(code);
  })
  .catch(async (err: unknown) => {
    console.error(`import-demo-runs: ${err instanceof Error ? err.message : String(err)}`);
    await closeDb();
    process.exit(1);
  });
