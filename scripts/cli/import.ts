// `quorum import FILE --from DIR --study ID --as EMAIL [...]` – registers a run and the decomposition
// that `quorum decompose` made of it elsewhere (a cluster job, say), as if the worker had made it:
// the run goes through the upload checks, the outputs are checked against it, the run becomes
// ready and its raters are assigned. Prints {runId, decompositionId, components, raters} as JSON.
import { parseArgs } from 'node:util';
import { createReadStream, statSync } from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import type { CliCommand } from './index';
import { MOTION_USAGE, motionFormat, motionOptions } from './motion-options';

const USAGE = 'usage: quorum import FILE --from DIR --study ID --as EMAIL [--sub S --ses S --task T --acq A --run R] ' + MOTION_USAGE;

const raw = (file: string) => ({
  body: Readable.toWeb(createReadStream(file)) as ReadableStream<Uint8Array>,
  contentLength: statSync(file).size,
});

export const importRun: CliCommand = {
  summary: 'register a run with its decompose output folder (from a cluster) in a study',
  usage: USAGE,
  async run(args) {
    const { values, positionals } = parseArgs({
      args,
      allowPositionals: true,
      options: {
        from: { type: 'string' },
        study: { type: 'string' },
        as: { type: 'string' },
        sub: { type: 'string' },
        ses: { type: 'string' },
        task: { type: 'string' },
        acq: { type: 'string' },
        run: { type: 'string' },
        ...motionOptions,
      },
    });
    const file = positionals[0];
    const studyId = Number(values.study);
    if (!file || !values.from || !Number.isInteger(studyId) || studyId < 1 || !values.as) {
      process.stderr.write(`quorum import: give the run FILE, --from DIR, --study ID and --as EMAIL (a lead of the study)\n${USAGE}\n`);
      return 2;
    }
    // loaded here: this command needs the database, the others do not
    const { importDecomposition } = await import('@/lib/runs/import-run');
    const { closeDb } = await import('@/lib/db/knex');
    try {
      const result = await importDecomposition({
        email: values.as,
        studyId,
        file,
        name: path.basename(file),
        open: () => raw(file),
        entities: { sub: values.sub, ses: values.ses, task: values.task, acq: values.acq, run: values.run },
        dir: path.resolve(values.from),
        motion: values.motion
          ? {
              name: path.basename(values.motion),
              open: () => raw(values.motion!),
              order: motionFormat(values).order,
              units: motionFormat(values).rotationUnits,
            }
          : undefined,
      });
      process.stdout.write(JSON.stringify(result, null, 2) + '\n');
      return 0;
    } catch (err) {
      process.stderr.write(`quorum import: ${err instanceof Error ? err.message : String(err)}\n`);
      return 1;
    } finally {
      await closeDb();
    }
  },
};
