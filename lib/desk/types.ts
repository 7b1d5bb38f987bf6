/**
 * Shapes the rating desk exchanges with the server (JSON). Shared by the route handlers, the
 * server page and the client hooks. Nothing here ever carries another rater's vote before the
 * rater has submitted the run: other raters' votes live only in VotesPayload.others, which the
 * server fills only after submission (and only when the study shows them).
 */

/** A component's time course and power spectrum, as the charts draw them. Plain numbers (float32 precision). */
export type ComponentSeries = {
  /** One value per kept volume (after the dropped initial volumes). */
  timecourse: number[];
  /** Power per frequency bin. */
  spectrum: number[];
  /** Hz, same length as spectrum. */
  frequencies: number[];
};

/** One component as the desk lists it: what the strip, the features and the verdict need. */
export type ListedComponent = {
  id: number;
  /** 1..k by variance explained. */
  idx: number;
  /** Fraction 0..1 of the run's variance. */
  varianceExplained: number;
  features: Record<string, number | null>;
};

/** One component with its series (the components API, Reconcile and the read-only run view). */
export type DeskComponent = ListedComponent & ComponentSeries;

/** The run as the desk needs it; static for one decomposition (cached for the whole session). */
export type DeskRun = {
  runId: number;
  decompositionId: number;
  name: string;
  studyId: number;
  studyName: string;
  trSeconds: number;
  droppedVolumes: number;
  /** Components in the decomposition (the desk lists k − reproducibility.hidden of them). */
  k: number;
  /** Warnings of the decomposition (dimension at its bound, FastICA not converged), shown above the desk. */
  warnings: Array<{ code: string; message: string }>;
  labelSet: string[];
  noiseKinds: string[];
  /** Framewise displacement (mm) per kept volume, when the run has motion parameters. */
  framewiseDisplacement: number[] | null;
  /** The six motion parameters per kept volume: translations x, y, z (mm) and rotations x, y, z (degrees), when the run has them. */
  motion?: { translations: number[][]; rotationsDeg: number[][] } | null;
  /** The structural underlay a lead attached (on the run's grid), or null; `version` changes with each upload (part of its address). */
  structural?: { name: string; version: string } | null;
  /** Where the rater stopped (1-based component number), or null before the first visit. */
  lastComponentIdx: number | null;
  /** The study's rule for components below its reproducibility threshold, and how many it hid. */
  reproducibility: { threshold: number; policy: 'flag' | 'last' | 'hide'; hidden: number };
};

/** The structural underlay's address part and its name, from its storage key (a new upload is a new address). */
export function structuralOf(key: string | null | undefined, name: string | null | undefined): DeskRun['structural'] {
  if (!key) return null;
  const version = key.replace(/^.*\//, '').replace(/\..*$/, '').slice(0, 16);
  return { name: name ?? 'structural image', version };
}

export type ComponentsPayload = { run: DeskRun; components: DeskComponent[] };

/**
 * What the rating desk's page carries: the components without their series but for the shown one;
 * the desk fetches the others' in one binary payload (series-payload.ts) while the page starts.
 */
export type DeskPagePayload = { run: DeskRun; components: ListedComponent[]; shown: ({ id: number } & ComponentSeries) | null };

/** The fields a rater sets on a vote. */
export type VoteFields = {
  label: string;
  noiseKind: string | null;
  confidence: number | null;
  note: string | null;
};

/** The rater's own vote as the server holds it. */
export type MyVote = VoteFields & { componentId: number; version: number; updatedAt: string };

/** Another rater's vote — sent only after this rater has submitted the run. */
export type OtherVote = Omit<VoteFields, 'note'> & { componentId: number; raterName: string; note: string | null };

export type AssignmentStatus = {
  submittedAt: string | null;
  /** True once a release contains the run: votes are frozen. */
  released: boolean;
  /** Why others' votes are not shown: 'not_submitted' (blinding) or 'study_hides'; null when shown. */
  othersHidden: 'not_submitted' | 'study_hides' | null;
};

export type VotesPayload = { status: AssignmentStatus; mine: MyVote[]; others: OtherVote[] | null };

/** Answer to PUT /api/runs/:id/votes/:componentId. */
export type SaveVoteResult = { vote: MyVote; merged: boolean; changed: boolean };
