// `quorum agreement` on a small committed TSV (tests/fixtures/agreement/small-ratings.tsv):
// 8 components × raters ana, ben, chen; chen's vote on c6 is an absent row and on c7 an empty label.
// Expected values are hand-computed from the formulas named in lib/agreement (sources there).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { agreement } from '@/scripts/cli/agreement';
import { commands } from '@/scripts/cli/index';

const TSV = path.resolve(__dirname, '../fixtures/agreement/small-ratings.tsv');

async function runCli(args: string[]) {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((out += String(s)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((err += String(s)), true));
  try {
    const code = await agreement.run(args);
    return { code, out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

afterEach(() => vi.restoreAllMocks());

describe('quorum agreement FILE', () => {
  it('is registered in the CLI', () => {
    expect(commands.agreement).toBe(agreement);
  });

  it('prints the agreement report as JSON with hand-checkable values', async () => {
    const { code, out, err } = await runCli([TSV, '--bootstrap', '200', '--seed', '3']);
    expect(err).toBe('');
    expect(code).toBe(0);
    const r = JSON.parse(out);
    expect(r.items).toBe(8);
    expect(r.raters).toEqual(['ana', 'ben', 'chen']);
    expect(r.categories).toEqual(['signal', 'noise', 'uncertain']);
    // per-item agreeing-pair shares 1, 1/3, 1, 1/3, 1, 0, 1, 1 → mean 17/24 (Fleiss 1971 P̄)
    expect(r.percentAgreement.value).toBeCloseTo(17 / 24, 12);
    // PABAK k = 3: (3 · 17/24 − 1) / 2 (Byrt et al. 1993)
    expect(r.pabak.value).toBeCloseTo(0.5625, 12);
    // Fleiss on the 6 items with 3 votes: P̄ = 7/9, p = (1/3, 2/3, 0), P̄e = 5/9 → κ = 0.5
    expect(r.fleissKappa.value).toBeCloseTo(0.5, 12);
    expect(r.fleissKappa.omitted).toBe(2);
    // ana|ben on 8 items: p_o = 6/8, p_e = (3·2 + 4·6)/64 → κ = 9/17 (Cohen 1960)
    expect(r.cohenKappa['ana|ben'].value).toBeCloseTo(9 / 17, 12);
    expect(r.cohenKappa['ana|ben'].n).toBe(8);
    expect(r.cohenKappa['ana|chen'].n).toBe(6);
    expect(Object.keys(r.cohenKappa).sort()).toEqual(['ana|ben', 'ana|chen', 'ben|chen']);
    for (const key of ['percentAgreement', 'fleissKappa', 'krippendorffAlpha', 'pabak', 'gwetAC1']) {
      expect(r[key].ci.resamples).toBe(200);
      expect(r[key].ci.lower).toBeLessThanOrEqual(r[key].ci.upper);
    }
    expect(r.cohenKappa['ana|ben'].ci.used + r.cohenKappa['ana|ben'].ci.skipped).toBe(200);
    expect(r.bootstrap).toMatchObject({ resamples: 200, seed: 3 });
    // same seed → same output
    expect((await runCli([TSV, '--bootstrap', '200', '--seed', '3'])).out).toBe(out);
  });

  it('reads CSV (RFC 4180 quoting) detected from the header line, and --bootstrap 0 gives no intervals', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'quorum-agreement-'));
    const file = path.join(dir, 'votes.txt');
    writeFileSync(file, 'Item,Rater,Label\n"c,1",ana,noise\n"c,1",ben,noise\nc2,ana,signal\nc2,ben,noise\nc3,ana,signal\nc3,ben,signal\n');
    const { code, out } = await runCli([file, '--bootstrap', '0']);
    expect(code).toBe(0);
    const r = JSON.parse(out);
    expect(r.items).toBe(3);
    expect(r.percentAgreement.value).toBeCloseTo(2 / 3, 12);
    expect(r.percentAgreement.ci).toBeNull();
    expect(r.bootstrap).toBeNull();
  });

  it('counts only the categories the file uses: a yes/no file is scored with two categories', async () => {
    // 10 items, 2 raters: both yes ×6, both no ×2, one disagreement each way → p_o = 0.8.
    const dir = mkdtempSync(path.join(tmpdir(), 'quorum-agreement-'));
    const file = path.join(dir, 'yes-no.tsv');
    const pairs = [...Array(6).fill(['yes', 'yes']), ['no', 'no'], ['no', 'no'], ['yes', 'no'], ['no', 'yes']] as [string, string][];
    writeFileSync(file, 'item\trater\tlabel\n' + pairs.map(([a, b], i) => `i${i}\tann\t${a}\ni${i}\tbo\t${b}\n`).join(''));
    const r = JSON.parse((await runCli([file, '--bootstrap', '0'])).out);
    expect(r.categories).toEqual(['yes', 'no']);
    expect(r.categoriesInFile).toEqual(['yes', 'no']);
    expect(r.categoriesDeclaredUnused).toEqual([]);
    expect(r.percentAgreement.value).toBeCloseTo(0.8, 12);
    // PABAK with two categories = 2·p_o − 1 (Byrt, Bishop & Carlin 1993, J Clin Epidemiol 46:423)
    expect(r.pabak.value).toBeCloseTo(0.6, 12);
    // AC1 with two categories: π = mean share of "yes" = 0.7, p_e = 2π(1 − π) = 0.42,
    // AC1 = (0.8 − 0.42) / (1 − 0.42) (Gwet 2008, Br J Math Stat Psychol 61:29; hand-computed)
    expect(r.gwetAC1.value).toBeCloseTo(0.38 / 0.58, 12);
    // κ does not depend on unused categories: p_e = 0.7·0.7 + 0.3·0.3 = 0.58 (Cohen 1960)
    expect(r.cohenKappa['ann|bo'].value).toBeCloseTo((0.8 - 0.58) / (1 - 0.58), 12);

    // a declared category no vote uses is counted, and said: PABAK with k = 3 is (3·0.8 − 1)/2
    const d = JSON.parse((await runCli([file, '--bootstrap', '0', '--categories', 'yes,maybe'])).out);
    expect(d.categories).toEqual(['yes', 'no', 'maybe']);
    expect(d.categoriesDeclaredUnused).toEqual(['maybe']);
    expect(d.pabak.value).toBeCloseTo(0.7, 12);
  });

  it('a file with one label only is refused with what to do', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'quorum-agreement-'));
    const file = path.join(dir, 'one.tsv');
    writeFileSync(file, 'item\trater\tlabel\nc1\tana\tnoise\nc1\tben\tnoise\n');
    const { code, err } = await runCli([file]);
    expect(code).toBe(1);
    expect(err).toMatch(/one label only \(noise\).*--categories/);
  });

  it('a missing column or an unreadable file → one line on stderr, exit 1', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'quorum-agreement-'));
    const bad = path.join(dir, 'bad.tsv');
    writeFileSync(bad, 'item\tcoder\tlabel\nc1\tana\tnoise\n');
    const a = await runCli([bad]);
    expect(a.code).toBe(1);
    expect(a.out).toBe('');
    expect(a.err).toMatch(/^quorum agreement: missing column "rater".*\n$/);
    expect(a.err.split('\n')).toHaveLength(2);
    const b = await runCli([path.join(dir, 'nope.tsv')]);
    expect(b.code).toBe(1);
    expect(b.err).toMatch(/^quorum agreement: no such file: .*nope\.tsv\n$/);
    const c = await runCli([TSV, '--bootstrap', 'many']);
    expect(c.code).toBe(1);
    expect(c.err).toMatch(/--bootstrap must be an integer/);
  });
});
