/**
 * The files of one released run (pure: strings in, strings out). Names are BIDS-style with our
 * own desc- words; every TSV has a JSON sidecar that describes each column and carries the caution.
 *
 *   <stem>_desc-decisions_components.tsv   one row per component: decision, how decided, votes, reason
 *   <stem>_desc-noiselist_components.tsv  the components to remove (1-based) with their noise kind
 *   <stem>_desc-noiselist_components.txt  the same numbers on one comma-separated line
 *   <stem>_desc-sources_timeseries.tsv    one column per component time course, one row per kept volume
 *   <stem>_desc-ratedfeatures_components.tsv  features + decision (a training table)
 *   <stem>_desc-sources_components.nii.gz the component z-maps (4D, volume c = component c), + .json
 */
import { EXPORT_CAUTION } from './cautions';
import { isRemoved, noiseList, noiseListLine, uncertainSentence, type UncertainPolicy } from './noise-list';
import { toTsv, type Cell } from './tabular';
import { EXPORT_FORMAT_SIDECAR } from './format';

export type ExportVote = { raterCode: string; label: string; noiseKind: string | null };
export type ExportComponent = {
  idx: number;
  label: string | null;
  noiseKind: string | null;
  method: string;
  reason: string | null;
  varianceExplained: number;
  features: Record<string, number | null>;
  votes: ExportVote[];
  /** length T */
  timecourse: Float32Array | null;
};
export type ReleaseStamp = { studyId: number; releaseId: number; version: number; releasedAt: string; software: string };
export type RunExportInput = {
  stem: string;
  entities: Record<string, string | null>;
  trSeconds: number | null;
  labelSet: string[];
  uncertainInExport: UncertainPolicy;
  components: ExportComponent[];
  release: ReleaseStamp;
};
export type TextFile = { name: string; content: string };

/**
 * Feature columns of the training tables, in order, with their sidecar descriptions. Undefined
 * values are written "n/a" (never 0): see computeComponentFeatures in lib/decomposition/features.ts.
 */
export const FEATURE_COLUMNS: Record<string, string> = {
  reproducibility:
    'Cross-restart reproducibility of the component (0..1): how closely the decomposition found it again from other starting points; n/a when it ran without restarts.',
  highFrequencyPower: 'Fraction of the time course power above 0.1 Hz (0..1).',
  edgeFraction:
    "Fraction of the map's supra-threshold voxels on the brain edge: within one voxel of a voxel outside the mask or darker than the brain-mask threshold in the mean image (0..1); n/a when fewer than 10 voxels pass the map's threshold.",
  clusterCount:
    "Number of 26-connected clusters of at least 10 supra-threshold voxels; n/a when fewer than 10 voxels pass the map's threshold.",
  largestClusterVoxels: 'Voxels in the largest supra-threshold cluster; n/a as above.',
  largestClusterFraction: 'Largest cluster as a fraction of all supra-threshold voxels (0..1); n/a as above.',
  mapThresholdZ:
    "The map's adaptive threshold in |z|: voxels more than 2.5 robust SDs (1.4826 × median absolute deviation) from the map's median are supra-threshold; n/a when fewer than 10 voxels pass it.",
  kurtosis: 'Excess kurtosis of the z-map over in-mask voxels.',
  skewness: 'Skewness of the z-map over in-mask voxels.',
  peakZ: 'Largest |z| of the map.',
  spikeScore: 'Largest robust z-score of a frame-to-frame jump of the time course (spikiness).',
  stepScore:
    'Largest shift of the time course mean at any split point, in pooled within-side SDs (a step); n/a when the run is too short to split.',
  trendR2: 'R² of a constant + linear + quadratic trend fitted to the time course (slow drift, 0..1); n/a for a constant time course.',
  motionCorrelation: 'Largest |Pearson r| of the time course with the motion parameters and their derivatives; n/a without motion.',
  fdCorrelation: 'Pearson r of the time course with framewise displacement (Power et al. 2012, 50 mm sphere); n/a without motion.',
  meanFramewiseDisplacement: 'Mean framewise displacement of the run in mm; n/a without motion.',
  temporalAutocorrelation: 'Lag-1 autocorrelation of the time course.',
};

const snake = (s: string) => s.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

function sidecar(
  description: string,
  columns: Record<string, { Description: string; Levels?: Record<string, string>; Units?: string }>,
  input: RunExportInput,
  extra: Record<string, unknown> = {},
) {
  return {
    ...columns,
    Description: description,
    Run: input.entities,
    ...extra,
    GeneratedBy: { Name: 'Quorum', Version: input.release.software },
    Release: {
      StudyId: input.release.studyId,
      ReleaseId: input.release.releaseId,
      Version: input.release.version,
      ReleasedAt: input.release.releasedAt,
    },
    Caution: EXPORT_CAUTION,
    ...EXPORT_FORMAT_SIDECAR,
  };
}

const json = (v: unknown) => JSON.stringify(v, null, 2) + '\n';

export const METHOD_LEVELS: Record<string, string> = {
  unanimous: 'every rater gave the same label',
  majority: 'a strict majority of the raters gave the label',
  reconciled: 'the study lead decided after the raters disagreed',
  override: 'the study lead set the label over the raters',
};

/** Every file of one run except the z-map NIfTI (which is copied from the decomposition). */
export function runExportFiles(input: RunExportInput): TextFile[] {
  const { stem, labelSet, uncertainInExport: policy } = input;
  const comps = [...input.components].sort((a, b) => a.idx - b.idx);
  const files: TextFile[] = [];
  const noise = noiseList(comps, policy);
  const rule = uncertainSentence(policy);

  // decisions
  const voteCols = labelSet.map((l) => `votes_${l}`);
  const header = [
    'component',
    'label',
    'noise_kind',
    'decided_by',
    'in_noise_list',
    ...voteCols,
    'votes_total',
    'rater_labels',
    'lead_reason',
    'variance_explained',
  ];
  const rows: Cell[][] = comps.map((c) => [
    c.idx,
    c.label,
    c.noiseKind,
    c.method,
    isRemoved(c.label, policy),
    ...labelSet.map((l) => c.votes.filter((v) => v.label === l).length),
    c.votes.length,
    c.votes.length
      ? [...c.votes]
          .sort((a, b) => a.raterCode.localeCompare(b.raterCode, 'en', { numeric: true }))
          .map((v) => `${v.raterCode}=${v.label}${v.noiseKind ? `/${v.noiseKind}` : ''}`)
          .join(';')
      : null,
    c.reason,
    c.varianceExplained,
  ]);
  files.push({ name: `${stem}_desc-decisions_components.tsv`, content: toTsv(header, rows) });
  files.push({
    name: `${stem}_desc-decisions_components.json`,
    content: json(
      sidecar(
        'The released decision on every component of the run, how it was reached and the votes behind it.',
        {
          component: { Description: 'Component number, 1..k, ordered by variance explained (1 = most).' },
          label: { Description: 'The decided label.', Levels: Object.fromEntries(labelSet.map((l) => [l, `decided ${l}`])) },
          noise_kind: { Description: 'The decided kind of noise (n/a unless the label is noise).' },
          decided_by: { Description: 'How the decision was reached.', Levels: METHOD_LEVELS },
          in_noise_list: {
            Description: `1 when the component is in the run's noise list, else 0. ${rule}`,
            Levels: { '1': 'removed', '0': 'kept' },
          },
          ...Object.fromEntries(
            labelSet.map((l) => [`votes_${l}`, { Description: `Number of submitted votes "${l}" for the component.` }]),
          ),
          votes_total: { Description: 'Number of submitted votes for the component.' },
          rater_labels: {
            Description:
              'Each rater\'s vote as CODE=label or CODE=label/noise_kind, separated by ";". Codes (R1, R2, …) are listed in the study\'s desc-raters table.',
          },
          lead_reason: { Description: 'The reason the study lead recorded when deciding (n/a for unanimous or majority decisions).' },
          variance_explained: { Description: "Fraction of the run's variance explained by the component (0..1)." },
        },
        input,
        { NoiseListRule: rule },
      ),
    ),
  });

  // noise list
  files.push({
    name: `${stem}_desc-noiselist_components.tsv`,
    content: toTsv(
      ['component', 'label', 'noise_kind'],
      comps.filter((c) => isRemoved(c.label, policy)).map((c) => [c.idx, c.label, c.noiseKind]),
    ),
  });
  files.push({
    name: `${stem}_desc-noiselist_components.json`,
    content: json(
      sidecar(
        'The components to remove from the run (the noise list). The same numbers are on one comma-separated line in the .txt file of the same name.',
        {
          component: {
            Description: 'Component number to remove, 1-based, as in the desc-decisions table and the volumes of the desc-sources NIfTI.',
          },
          label: { Description: 'The decided label (noise, or uncertain when the study removes uncertain components).' },
          noise_kind: { Description: 'The decided kind of noise (n/a when none was given).' },
        },
        input,
        {
          NoiseListRule: rule,
          ComponentCount: comps.length,
          NoiseCount: noise.length,
          OneLineFile: `${stem}_desc-noiselist_components.txt`,
        },
      ),
    ),
  });
  files.push({ name: `${stem}_desc-noiselist_components.txt`, content: noiseListLine(noise) + '\n' });

  // time courses
  const T = comps[0]?.timecourse?.length ?? 0;
  const tcHeader = comps.map((c) => `component_${c.idx}`);
  const tcRows: Cell[][] = [];
  for (let t = 0; t < T; t++) tcRows.push(comps.map((c) => (c.timecourse ? c.timecourse[t] : null)));
  files.push({ name: `${stem}_desc-sources_timeseries.tsv`, content: toTsv(tcHeader, tcRows) });
  files.push({
    name: `${stem}_desc-sources_timeseries.json`,
    content: json(
      sidecar(
        'Component time courses: one column per component, one row per kept volume (initial volumes dropped by the decomposition are not included).',
        Object.fromEntries(
          comps.map((c) => [`component_${c.idx}`, { Description: `Time course of component ${c.idx} (arbitrary units, mean about 0).` }]),
        ),
        input,
        {
          RepetitionTime: input.trSeconds,
          SamplingFrequency: input.trSeconds ? 1 / input.trSeconds : null,
          Rows: T,
        },
      ),
    ),
  });

  // features + decisions (training table)
  const featureKeys = Object.keys(FEATURE_COLUMNS);
  files.push({
    name: `${stem}_desc-ratedfeatures_components.tsv`,
    content: toTsv(
      ['component', ...featureKeys.map(snake), 'variance_explained', 'label', 'noise_kind', 'decided_by'],
      comps.map((c) => [c.idx, ...featureKeys.map((k) => c.features[k] ?? null), c.varianceExplained, c.label, c.noiseKind, c.method]),
    ),
  });
  files.push({
    name: `${stem}_desc-ratedfeatures_components.json`,
    content: json(
      sidecar(
        'Component features with the released decision: a training table for automatic classifiers.',
        featureColumns(labelSet),
        input,
        { NoiseListRule: rule },
      ),
    ),
  });

  // z-maps sidecar (the NIfTI itself is copied from the decomposition)
  files.push({
    name: `${stem}_desc-sources_components.json`,
    content: json(
      sidecar(
        'Component spatial maps as one 4D NIfTI-1 (float32, gzip): volume c (1-based) is component c, z-scored, oriented so the heavy tail is positive; 0 outside the decomposition mask.',
        {},
        input,
        {
          Volumes: comps.length,
          Units: 'z',
          NoiseList: noise,
          NoiseListRule: rule,
        },
      ),
    ),
  });
  return files;
}

export function featureColumns(labelSet: string[]) {
  return {
    component: { Description: 'Component number, 1..k, by variance explained.' },
    ...Object.fromEntries(Object.entries(FEATURE_COLUMNS).map(([k, d]) => [snake(k), { Description: d }])),
    variance_explained: { Description: "Fraction of the run's variance explained by the component (0..1)." },
    label: { Description: 'The released decision.', Levels: Object.fromEntries(labelSet.map((l) => [l, `decided ${l}`])) },
    noise_kind: { Description: 'The decided kind of noise (n/a unless noise).' },
    decided_by: { Description: 'How the decision was reached.', Levels: METHOD_LEVELS },
  };
}

export const mapFileName = (stem: string) => `${stem}_desc-sources_components.nii.gz`;
export { snake as featureColumnName };
