import { describe, expect, it } from 'vitest';
import { groupDroppedFiles, isRunFile, runStem } from '@/lib/runs/folder-files';

// File names follow the BIDS specification 1.9 ("File name structure": entities, suffix,
// extension; derivatives carry desc-), and the layout of our own demo data (scripts/make-demo-data.ts).
const f = (name: string) => ({ name });

describe('isRunFile', () => {
  it('takes BIDS bold images and plain NIfTI names as runs', () => {
    expect(isRunFile('sub-01_ses-1_task-rest_bold.nii.gz')).toBe(true);
    expect(isRunFile('sub-01_task-rest_run-2_bold.nii')).toBe(true);
    expect(isRunFile('rest1.nii.gz')).toBe(true);
  });
  it('leaves out derivatives, masks, anatomy, references and non-images', () => {
    expect(isRunFile('sub-01_ses-1_task-rest_desc-truth_maps.nii.gz')).toBe(false);
    expect(isRunFile('sub-01_ses-1_task-rest_desc-brain_mask.nii.gz')).toBe(false);
    expect(isRunFile('sub-01_ses-1_T1w.nii.gz')).toBe(false);
    expect(isRunFile('sub-01_task-rest_sbref.nii.gz')).toBe(false);
    expect(isRunFile('sub-01_ses-1_task-rest_bold.json')).toBe(false);
    expect(isRunFile('sub-01_ses-1_task-rest_desc-motion_timeseries.tsv')).toBe(false);
  });
  it('stems drop _bold and the extension', () => {
    expect(runStem('sub-01_ses-1_task-rest_bold.nii.gz')).toBe('sub-01_ses-1_task-rest');
    expect(runStem('data/rest1.nii')).toBe('rest1');
  });
});

describe('groupDroppedFiles', () => {
  it('sorts a demo-data folder of two runs: 2 runs with motion table and sidecar, the rest set aside', () => {
    const names = ['dataset_description.json'];
    for (const s of ['01', '02']) {
      const base = `sub-${s}_ses-1_task-rest`;
      names.push(
        `${base}_bold.nii.gz`,
        `${base}_bold.json`,
        `${base}_desc-motion_timeseries.tsv`,
        `${base}_desc-motion_timeseries.json`,
        `${base}_desc-truth_components.json`,
        `${base}_desc-truth_maps.nii.gz`,
      );
    }
    const g = groupDroppedFiles(names.map(f));
    expect(g.runs.map((r) => [r.file.name, r.motion?.name, r.sidecar?.name, r.mask])).toEqual([
      ['sub-01_ses-1_task-rest_bold.nii.gz', 'sub-01_ses-1_task-rest_desc-motion_timeseries.tsv', 'sub-01_ses-1_task-rest_bold.json', null],
      ['sub-02_ses-1_task-rest_bold.nii.gz', 'sub-02_ses-1_task-rest_desc-motion_timeseries.tsv', 'sub-02_ses-1_task-rest_bold.json', null],
    ]);
    expect(g.ignored.map((x) => x.name).sort()).toEqual([
      'dataset_description.json',
      'sub-01_ses-1_task-rest_desc-motion_timeseries.json',
      'sub-01_ses-1_task-rest_desc-truth_components.json',
      'sub-01_ses-1_task-rest_desc-truth_maps.nii.gz',
      'sub-02_ses-1_task-rest_desc-motion_timeseries.json',
      'sub-02_ses-1_task-rest_desc-truth_components.json',
      'sub-02_ses-1_task-rest_desc-truth_maps.nii.gz',
    ]);
  });

  it('pairs masks and plain motion files, and does not give run-1 the companions of run-10', () => {
    const g = groupDroppedFiles(
      [
        'sub-01_task-rest_run-1_bold.nii.gz',
        'sub-01_task-rest_run-10_bold.nii.gz',
        'sub-01_task-rest_run-10_motion.par',
        'sub-01_task-rest_run-1_desc-brain_mask.nii.gz',
        'notes.txt',
      ].map(f),
    );
    const by = Object.fromEntries(g.runs.map((r) => [r.file.name, r]));
    expect(by['sub-01_task-rest_run-10_bold.nii.gz']!.motion?.name).toBe('sub-01_task-rest_run-10_motion.par');
    expect(by['sub-01_task-rest_run-1_bold.nii.gz']!.motion).toBeNull();
    expect(by['sub-01_task-rest_run-1_bold.nii.gz']!.mask?.name).toBe('sub-01_task-rest_run-1_desc-brain_mask.nii.gz');
    expect(g.ignored.map((x) => x.name)).toEqual(['notes.txt']);
  });
});
