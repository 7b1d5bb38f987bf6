/**
 * Sorting a dropped folder (or a many-file pick) into runs and their companions by name, the
 * way a BIDS dataset lays them out (BIDS specification 1.9, "File name structure" and the
 * derivatives convention: entities key-value, then a suffix, then the extension; derived files
 * carry a desc- entity):
 *
 * - a run is a NIfTI image without a desc- entity whose suffix is `bold` (or a plain name with no
 *   BIDS suffix at all, e.g. `rest1.nii.gz`);
 * - its motion table is `<stem>_desc-motion_timeseries.tsv` or `<stem>_motion.(tsv|txt|par|csv)`;
 * - its brain mask is `<stem>[_desc-<label>]_mask.nii[.gz]`;
 * - its sidecar is `<stem>_bold.json` (RepetitionTime and the like; Quorum reads the header);
 * - everything else (dataset_description.json, truth or derivative maps, other images, the motion
 *   table's own sidecar, README…) is not a run and is set aside, listed by name.
 *
 * `<stem>` is the run's name without `_bold` and the extension. Browser-safe (no server import).
 */
export type Grouped<F extends { name: string }> = {
  runs: { file: F; motion: F | null; mask: F | null; sidecar: F | null }[];
  ignored: F[];
};

const NIFTI = /\.nii(\.gz)?$/i;
const DESC = /(?:^|_)desc-[A-Za-z0-9]+/;
/** A BIDS suffix: the last `_word` before the extension, when the name has entities. */
const SUFFIX = /_([A-Za-z0-9]+)\.nii(?:\.gz)?$/i;

const baseName = (name: string) => name.split(/[\\/]/).pop() ?? name;

/** Whether this file is a run (see the module comment). */
export function isRunFile(name: string): boolean {
  const base = baseName(name);
  if (!NIFTI.test(base) || DESC.test(base)) return false;
  if (!/[A-Za-z0-9]+-[A-Za-z0-9]+_/.test(base)) return true; // no BIDS entities: a plain name is taken as a run
  const suffix = SUFFIX.exec(base)?.[1];
  return suffix === undefined || suffix === 'bold';
}

/** The stem companions are matched on: the name without `_bold` and the extension. */
export function runStem(name: string): string {
  return baseName(name)
    .replace(NIFTI, '')
    .replace(/_bold$/, '');
}

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

export function groupDroppedFiles<F extends { name: string }>(files: F[]): Grouped<F> {
  const runs: Grouped<F>['runs'] = files
    .filter((f) => isRunFile(f.name))
    .map((file) => ({ file, motion: null, mask: null, sidecar: null }));
  const used = new Set<F>(runs.map((r) => r.file));
  // longest stems first, so sub-01_run-1 does not take the companions of sub-01_run-10
  const byStem = [...runs].sort((a, b) => runStem(b.file.name).length - runStem(a.file.name).length);
  for (const f of files) {
    if (used.has(f)) continue;
    const base = baseName(f.name);
    for (const r of byStem) {
      const stem = escape(runStem(r.file.name));
      if (!r.motion && new RegExp(`^${stem}(?:_desc-motion_timeseries\\.tsv|_motion\\.(?:tsv|txt|par|csv))$`, 'i').test(base)) r.motion = f;
      else if (!r.mask && new RegExp(`^${stem}(?:_desc-[A-Za-z0-9]+)?_mask\\.nii(?:\\.gz)?$`, 'i').test(base)) r.mask = f;
      else if (!r.sidecar && new RegExp(`^${stem}_bold\\.json$`, 'i').test(base)) r.sidecar = f;
      else continue;
      used.add(f);
      break;
    }
  }
  return { runs, ignored: files.filter((f) => !used.has(f)) };
}
