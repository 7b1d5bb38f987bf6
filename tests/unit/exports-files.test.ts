// Export files of one run: BIDS-style names with our desc- words, sidecars describing every column
// with the caution, noise list rules (uncertain kept by default, removed on request), TSV n/a.
import { describe, expect, it } from 'vitest';
import { runExportFiles, type RunExportInput } from '@/lib/exports/run-files';
import { noiseList } from '@/lib/exports/noise-list';
import { parseTsv, toTsv } from '@/lib/exports/tabular';
import { EXPORT_CAUTION } from '@/lib/exports/cautions';
import { methodsParagraph } from '@/lib/reports/methods-paragraph';

const input = (policy: 'keep' | 'remove'): RunExportInput => ({
  stem: 'sub-01_ses-1_task-rest_run-1',
  entities: { sub: '01', ses: '1', task: 'rest', acq: null, run: '1' },
  trSeconds: 2,
  labelSet: ['signal', 'noise', 'uncertain'],
  uncertainInExport: policy,
  release: { studyId: 3, releaseId: 9, version: 2, releasedAt: '2026-12-04T10:00:00.000Z', software: '0.1.0' },
  components: [1, 2, 3].map((idx) => ({
    idx,
    label: ['signal', 'noise', 'uncertain'][idx - 1]!,
    noiseKind: idx === 2 ? 'motion' : null,
    method: idx === 2 ? 'reconciled' : 'unanimous',
    reason: idx === 2 ? 'edge ring' : null,
    varianceExplained: 0.1 * idx,
    features: { kurtosis: idx, highFrequencyPower: 0.5 },
    votes: [
      { raterCode: 'R2', label: 'noise', noiseKind: 'motion' },
      { raterCode: 'R1', label: 'signal', noiseKind: null },
    ],
    timecourse: Float32Array.from([idx, -idx, 0.5]),
  })),
});

describe('run export files', () => {
  it('names every file BIDS-style and describes every TSV column in its sidecar, with the caution', () => {
    const files = runExportFiles(input('keep'));
    expect(files.map((f) => f.name).sort()).toEqual(
      [
        'desc-decisions_components.json',
        'desc-decisions_components.tsv',
        'desc-noiselist_components.json',
        'desc-noiselist_components.tsv',
        'desc-noiselist_components.txt',
        'desc-ratedfeatures_components.json',
        'desc-ratedfeatures_components.tsv',
        'desc-sources_components.json',
        'desc-sources_timeseries.json',
        'desc-sources_timeseries.tsv',
      ].map((n) => `sub-01_ses-1_task-rest_run-1_${n}`),
    );
    for (const f of files.filter((x) => x.name.endsWith('.tsv'))) {
      const side = JSON.parse(files.find((x) => x.name === f.name.replace('.tsv', '.json'))!.content);
      for (const h of parseTsv(f.content).header) expect(side[h]?.Description, `${f.name} ${h}`).toBeTruthy();
      expect(side.Caution).toBe(EXPORT_CAUTION);
    }
    const verdicts = parseTsv(files.find((f) => f.name.endsWith('decisions_components.tsv'))!.content);
    expect(verdicts.rows[1]).toEqual([
      '2',
      'noise',
      'motion',
      'reconciled',
      '1',
      '1',
      '1',
      '0',
      '2',
      'R1=signal;R2=noise/motion',
      'edge ring',
      '0.2',
    ]);
    expect(verdicts.rows[0]![verdicts.header.indexOf('lead_reason')]).toBe('n/a');
  });

  it('keeps uncertain components out of the noise list unless the study removes them, and says so', () => {
    const keep = runExportFiles(input('keep'));
    expect(keep.find((f) => f.name.endsWith('.txt'))!.content).toBe('2\n');
    expect(JSON.parse(keep.find((f) => f.name.endsWith('noiselist_components.json'))!.content).NoiseListRule).toMatch(
      /NOT in the noise list/,
    );
    const remove = runExportFiles(input('remove'));
    expect(remove.find((f) => f.name.endsWith('.txt'))!.content).toBe('2,3\n');
    expect(
      noiseList(
        [
          { idx: 4, label: 'noise' },
          { idx: 1, label: 'noise' },
        ],
        'keep',
      ),
    ).toEqual([1, 4]);
  });

  it('writes n/a for missing values and no tabs inside cells', () => {
    expect(
      toTsv(
        ['a', 'b'],
        [
          [null, 'x\ty'],
          [Number.NaN, true],
        ],
      ),
    ).toBe('a\tb\nn/a\tx y\nn/a\t1\n');
  });
});

describe('methods paragraph', () => {
  it('states the decomposition, raters, rule, statistics with CIs and bootstrap settings, and how disagreements were resolved', () => {
    const ci = { lower: 0.61, upper: 0.8 };
    const text = methodsParagraph({
      software: '0.1.0',
      runs: 12,
      components: 300,
      k: { min: 18, max: 31, median: 25 },
      decomposition: {
        dimMethods: ['laplace'],
        contrasts: ['logcosh'],
        tolerance: 1e-4,
        maxIter: 200,
        dropVolumes: [4],
        varianceNorm: true,
        detrend: false,
        masks: ['automatic'],
      },
      ratersPerRun: 3,
      votesPerComponent: { min: 3, max: 3, mean: 3 },
      consensusRule: 'majority',
      labelSet: ['signal', 'noise', 'uncertain'],
      uncertainInExport: 'keep',
      bootstrap: { resamples: 1000, seed: 1 },
      ratings: { blinding: true, showVotesAfterSubmit: true, reopened: { assignments: 0, times: 0 }, raters: 3, certified: null },
      report: {
        summary: {
          items: 300,
          overall: {
            krippendorffAlpha: { value: 0.712, ci, n: 300 },
            fleissKappa: { value: 0.7, ci, n: 300 },
            pabak: { value: 0.8, ci, n: 300 },
            gwetAC1: { value: 0.83, ci, n: 300 },
            percentAgreement: { value: 0.9, ci: { lower: 0.88, upper: 0.92 }, n: 300 },
          },
        },
        raters: [
          { id: 1, name: 'a', votes: 1 },
          { id: 2, name: 'b', votes: 1 },
          { id: 3, name: 'c', votes: 1 },
        ],
        decisions: { total: 300, pending: 0, unanimous: 200, majority: 80, reconciled: 20, override: 0 },
      } as never,
    });
    expect(text).toContain('Each of 12 fMRI runs');
    expect(text).toContain('first 4 volumes');
    expect(text).toContain("Minka's Laplace");
    expect(text).toContain('18–31 components per run (median 25; 300 in all)');
    expect(text).toContain('3 raters per run');
    expect(text).toContain('strict majority');
    expect(text).toContain("Krippendorff's α (nominal) 0.71 (95% CI 0.61–0.80)");
    expect(text).toContain('percent agreement 90.00 % (95% CI 88.00–92.00)');
    expect(text).toContain('1000 resamples, seed 1');
    expect(text).toContain('20 (6.67 %) were resolved by the study lead');
    expect(text).toContain('uncertain components were kept');
  });
});

describe('features in the rated-features table (training table)', () => {
  it('writes undefined features as n/a (BIDS), never 0, and has reproducibility, step and drift columns described in the sidecar', () => {
    const base = input('keep');
    const features = {
      reproducibility: 0.93,
      edgeFraction: null,
      clusterCount: null,
      largestClusterVoxels: null,
      largestClusterFraction: null,
      mapThresholdZ: null,
      stepScore: 4.2,
      trendR2: 0.71,
      kurtosis: 3,
    };
    const files = runExportFiles({ ...base, components: base.components.map((c) => ({ ...c, features })) });
    const tsv = files.find((f) => f.name.endsWith('desc-ratedfeatures_components.tsv'))!;
    const { header, rows } = parseTsv(tsv.content);
    for (const col of ['reproducibility', 'edge_fraction', 'cluster_count', 'map_threshold_z', 'step_score', 'trend_r2'])
      expect(header).toContain(col);
    const at = (col: string) => rows[0]![header.indexOf(col)];
    expect(at('edge_fraction')).toBe('n/a');
    expect(at('cluster_count')).toBe('n/a');
    expect(at('map_threshold_z')).toBe('n/a');
    expect(at('reproducibility')).toBe('0.93');
    expect(at('step_score')).toBe('4.2');
    expect(at('trend_r2')).toBe('0.71');
    expect(at('motion_correlation')).toBe('n/a'); // absent from the stored features: not computed
    const sidecar = JSON.parse(files.find((f) => f.name.endsWith('desc-ratedfeatures_components.json'))!.content);
    for (const col of ['reproducibility', 'step_score', 'trend_r2', 'map_threshold_z'])
      expect(sidecar[col].Description.length).toBeGreaterThan(20);
  });
});
