/** The product's protocol vocabulary (a leaf: imports only ./roles): keys stored in the database and the plain labels people see. */

export const LABEL_KEYS = ['signal', 'noise', 'uncertain'] as const;
export type LabelKey = (typeof LABEL_KEYS)[number];

export const LABEL_NAMES: Record<LabelKey, string> = {
  signal: 'Signal',
  noise: 'Noise',
  uncertain: 'Uncertain',
};

export const NOISE_KIND_KEYS = ['motion', 'pulsation', 'vascular', 'csf', 'white-matter', 'susceptibility', 'scanner', 'other'] as const;
export type NoiseKindKey = (typeof NOISE_KIND_KEYS)[number];

export const NOISE_KIND_NAMES: Record<NoiseKindKey, string> = {
  motion: 'Motion',
  pulsation: 'Physiological pulsation',
  vascular: 'Vascular',
  csf: 'CSF',
  'white-matter': 'White matter',
  susceptibility: 'Susceptibility',
  scanner: 'Scanner artefact',
  other: 'Other',
};

/** Display name of a label key (a study may store keys of its own: shown as they are). */
export const labelName = (key: string) => (LABEL_NAMES as Record<string, string>)[key] ?? key;
/** Display name of a noise-kind key. */
export const noiseKindName = (key: string) => (NOISE_KIND_NAMES as Record<string, string>)[key] ?? key;

export const CONSENSUS_RULES = ['unanimous', 'majority', 'lead'] as const;
export type ConsensusRule = (typeof CONSENSUS_RULES)[number];

export const CONSENSUS_NAMES: Record<ConsensusRule, string> = {
  unanimous: 'Unanimous only (any disagreement goes to a lead)',
  majority: 'Strict majority (ties go to a lead)',
  lead: 'A lead decides every disagreement',
};

export const DIM_METHODS = ['iid-mdl', 'iid-aic', 'laplace', 'aic', 'mdl', 'fixed', 'variance'] as const;
/** How a study sets the number of components (the engine's own `DimMethod` carries the numbers). */
export type DimSetting = (typeof DIM_METHODS)[number];

export const DIM_METHOD_NAMES: Record<DimSetting, string> = {
  'iid-mdl': 'Automatic (MDL on independent voxels)',
  'iid-aic': 'AIC on independent voxels',
  laplace: 'Laplace evidence',
  aic: 'AIC',
  mdl: 'MDL',
  fixed: 'Fixed number of components',
  variance: 'Fraction of variance explained',
};

// the role vocabulary (facility and study roles) is defined once, in lib/vocabulary/roles.ts
import type { StudyRole } from './roles';

export const STUDY_ROLE_NAMES: Record<StudyRole, string> = {
  lead: 'Lead',
  rater: 'Rater',
  observer: 'Observer',
};

/** What the desk does with components whose reproducibility is below the study's threshold. */
export const LOW_REPRODUCIBILITY_POLICIES = ['flag', 'last', 'hide'] as const;
export type LowReproducibilityPolicy = (typeof LOW_REPRODUCIBILITY_POLICIES)[number];

export const LOW_REPRODUCIBILITY_NAMES: Record<LowReproducibilityPolicy, string> = {
  flag: 'Flag them on the desk (shown in order, marked)',
  last: 'Flag them and put them last in the rater’s list',
  hide: 'Hide them from raters (the lead decides them in Reconcile)',
};

/**
 * The protocol fields a study stores (lib/db/queries/studies.ts writes them). The study form's
 * schema (lib/studies/schema.ts) validates them: its output must be assignable to this.
 */
export type ProtocolValues = {
  name: string;
  description: string;
  ratersPerRun: number;
  consensusRule: ConsensusRule;
  allowUncertain: boolean;
  noiseKinds: NoiseKindKey[];
  blinding: boolean;
  showVotesAfterSubmit: boolean;
  dropVolumes: number;
  dimMethod: DimSetting;
  fixedComponents?: number | null;
  varianceFraction?: number | null;
  varianceNorm: boolean;
  detrend: boolean;
  reproducibilityThreshold?: number;
  lowReproducibility?: LowReproducibilityPolicy;
};
