// `quorum agreement FILE [--bootstrap N] [--seed S] [--categories a,b,c]` – inter-rater agreement
// of long-format ratings (CSV or TSV with columns item, rater, label) as JSON on stdout.
import { readFile } from 'node:fs/promises';
import { parseArgs } from 'node:util';
import {
  AgreementError,
  bootstrapTableStat,
  cohenKappa,
  DEFAULT_RESAMPLES,
  DEFAULT_SEED,
  detectFormat,
  parseRatingsText,
  ratingsTableFromVotes,
  studyAgreement,
  type StatResult,
} from '@/lib/agreement';
import type { CliCommand } from './index';

const USAGE =
  'usage: quorum agreement FILE [--bootstrap N (default 1000, 0 = no intervals)] [--seed S (default 1)] [--categories a,b,c (categories no vote uses, counted too)]';
/** Quorum's label set, for the order of the categories found in the file. */
const DEFAULT_CATEGORIES = ['signal', 'noise', 'uncertain'];

function integerOption(raw: string | undefined, name: string, fallback: number, min: number): number {
  if (raw === undefined) return fallback;
  const v = Number(raw);
  if (!Number.isInteger(v) || v < min) throw new AgreementError('bad_input', `--${name} must be an integer ≥ ${min}, got "${raw}"`);
  return v;
}

/** Runs the agreement computation on a file; returns the JSON-ready report. */
export async function agreementReport(file: string, opts: { bootstrap: number; seed: number; categories?: string[] }) {
  const text = await readFile(file, 'utf8');
  const { votes, labels } = parseRatingsText(text, detectFormat(file, text));
  // The categories are those present in the file (Quorum's label order first, then others in order of
  // first appearance), plus any declared with --categories that no vote uses. Counting categories no
  // one could choose would change PABAK and AC1 (both depend on the number of categories).
  const present = [...DEFAULT_CATEGORIES.filter((c) => labels.includes(c)), ...labels.filter((l) => !DEFAULT_CATEGORIES.includes(l))];
  const declared = opts.categories ?? [];
  const categories = [...present, ...declared.filter((c) => !present.includes(c))];
  if (categories.length < 2) {
    throw new AgreementError(
      'bad_input',
      `the file uses one label only (${categories[0] ?? 'none'}); agreement needs at least two categories — declare the others with --categories`,
    );
  }
  const table = ratingsTableFromVotes({ categories, votes });
  const byItem = new Map<string, Record<string, string | null>>();
  for (const v of votes) {
    const rec = byItem.get(v.item) ?? {};
    rec[v.rater] = v.label;
    byItem.set(v.item, rec);
  }
  const boot = opts.bootstrap > 0 ? { resamples: opts.bootstrap, seed: opts.seed } : (false as const);
  const study = studyAgreement({
    categories,
    items: [...byItem].map(([id, rec]) => ({ id, runId: 'file', votes: rec })),
    bootstrap: boot,
  });
  const o = study.overall;
  const cohen: Record<string, StatResult & { ci: unknown }> = {};
  for (const p of study.pairs) {
    cohen[`${p.raterA}|${p.raterB}`] = {
      ...p.cohenKappa,
      ci: boot ? bootstrapTableStat(table, (t, sel) => cohenKappa(t, p.raterA, p.raterB, sel), boot) : null,
    };
  }
  return {
    items: study.items,
    raters: study.raters,
    excludedRaters: study.excludedRaters,
    categories,
    categoriesInFile: present,
    categoriesDeclaredUnused: categories.filter((c) => !present.includes(c)),
    percentAgreement: o.percentAgreement,
    fleissKappa: o.fleissKappa,
    krippendorffAlpha: o.krippendorffAlpha,
    pabak: o.pabak,
    gwetAC1: o.gwetAC1,
    specificAgreement: o.specificAgreement,
    cohenKappa: cohen,
    bootstrap: boot ? { resamples: boot.resamples, seed: boot.seed, level: 0.95, method: 'percentile, resampling items' } : null,
  };
}

export const agreement: CliCommand = {
  summary: 'inter-rater agreement of a CSV/TSV of votes (item, rater, label) as JSON',
  usage: USAGE,
  async run(args) {
    try {
      const { values, positionals } = parseArgs({
        args,
        options: { bootstrap: { type: 'string' }, seed: { type: 'string' }, categories: { type: 'string' } },
        allowPositionals: true,
      });
      if (positionals.length !== 1) throw new Error(`expected exactly one FILE. ${USAGE}`);
      const report = await agreementReport(positionals[0], {
        bootstrap: integerOption(values.bootstrap, 'bootstrap', DEFAULT_RESAMPLES, 0),
        seed: integerOption(values.seed, 'seed', DEFAULT_SEED, 0),
        categories: values.categories
          ?.split(',')
          .map((c) => c.trim())
          .filter(Boolean),
      });
      process.stdout.write(`${JSON.stringify(report, null, 2)}\n`);
      return 0;
    } catch (err) {
      const e = err as NodeJS.ErrnoException;
      const message =
        e.code === 'ENOENT'
          ? `no such file: ${e.path}`
          : e.code === 'EISDIR'
            ? `not a file: ${positionalsHint(args)}`
            : (e.message ?? String(err));
      process.stderr.write(`quorum agreement: ${message.split('\n')[0]}\n`);
      return 1;
    }
  },
};

function positionalsHint(args: string[]): string {
  return args.find((a) => !a.startsWith('--')) ?? '';
}
