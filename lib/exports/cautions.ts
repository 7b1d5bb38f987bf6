/** The caution every exported sidecar, manifest and report carries (DESIGN.md §8). */
export const EXPORT_CAUTION =
  'Research software: not for diagnosis, presurgical mapping or any clinical decision. Results depend on preprocessing and on rater training. ' +
  'Local ethics approval and data-protection rules govern the use and sharing of human data; share only de-identified data.';

export const CAUTIONS: readonly string[] = [
  'Research software: not for diagnosis, presurgical mapping or any clinical decision.',
  'Results depend on preprocessing and on rater training.',
  'Local ethics approval and data-protection rules govern the use and sharing of human data; share only de-identified data.',
];
