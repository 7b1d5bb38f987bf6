/** Display names of label and noise-kind keys (studies store keys; the UI shows these). */
export const LABEL_NAMES: Record<string, string> = {
  signal: 'Signal',
  noise: 'Noise',
  uncertain: 'Uncertain',
};

export const NOISE_KIND_NAMES: Record<string, string> = {
  motion: 'Motion',
  pulsation: 'Physiological pulsation',
  vascular: 'Vascular',
  csf: 'CSF',
  'white-matter': 'White matter',
  susceptibility: 'Susceptibility',
  scanner: 'Scanner artefact',
  other: 'Other',
};

export const labelName = (key: string) => LABEL_NAMES[key] ?? key;
export const noiseKindName = (key: string) => NOISE_KIND_NAMES[key] ?? key;
