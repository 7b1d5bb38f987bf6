/**
 * Zod schemas of a study's protocol, shared by the study form (react-hook-form resolver) and the
 * route handlers. The create schema is the whole protocol; the update schema is its partial.
 */
import { z } from 'zod';
import { emailSchema } from '@/lib/auth/schemas';
import { CONSENSUS_RULES, DIM_METHODS, LOW_REPRODUCIBILITY_POLICIES, NOISE_KIND_KEYS } from '@/lib/vocabulary/protocol';
import { STUDY_ROLES } from '@/lib/vocabulary/roles';

const int = (what: string) =>
  z.number({ message: `Enter ${what} as a whole number.` }).int({ message: `Enter ${what} as a whole number.` });

/** The protocol's fields without the cross-field rules (so .partial/.omit stay available). */
export const studyFields = z.object({
  name: z
    .string()
    .trim()
    .min(3, { message: 'Give the study a name of at least 3 characters.' })
    .max(200, { message: 'Use at most 200 characters.' }),
  description: z.string().trim().max(5000, { message: 'Use at most 5000 characters.' }).optional().default(''),
  ratersPerRun: int('the raters per run').min(1, { message: 'At least 1 rater per run.' }).max(5, { message: 'At most 5 raters per run.' }),
  consensusRule: z.enum(CONSENSUS_RULES, { message: 'Choose a consensus rule.' }),
  /** "signal" and "noise" are always in the label set; "uncertain" may be left out. */
  allowUncertain: z.boolean(),
  noiseKinds: z.array(z.enum(NOISE_KIND_KEYS)).min(1, { message: 'Keep at least one noise kind.' }),
  blinding: z.boolean(),
  showVotesAfterSubmit: z.boolean(),
  dropVolumes: int('the initial volumes to drop').min(0, { message: 'Cannot be negative.' }).max(500, { message: 'At most 500 volumes.' }),
  dimMethod: z.enum(DIM_METHODS, { message: 'Choose how the number of components is found.' }),
  fixedComponents: int('the number of components')
    .min(2, { message: 'At least 2 components.' })
    .max(500, { message: 'At most 500 components.' })
    .nullable()
    .optional(),
  varianceFraction: z
    .number({ message: 'Enter a fraction such as 0.9.' })
    .gt(0, { message: 'Use a fraction above 0.' })
    .lt(1, { message: 'Use a fraction below 1.' })
    .nullable()
    .optional(),
  varianceNorm: z.boolean(),
  detrend: z.boolean(),
  /** Components with reproducibility below this (0..1) are flagged, put last or hidden. */
  reproducibilityThreshold: z
    .number({ message: 'Enter a reproducibility between 0 and 1, such as 0.8.' })
    .min(0, { message: 'Use a value from 0 to 1.' })
    .max(1, { message: 'Use a value from 0 to 1.' })
    .optional(),
  /** Left out: the database default (flag, 0.8). Not .default(): the update schema's .partial() would then reset it. */
  lowReproducibility: z
    .enum(LOW_REPRODUCIBILITY_POLICIES, { message: 'Choose what the desk does with components below the threshold.' })
    .optional(),
});

type DimFields = { dimMethod?: string; fixedComponents?: number | null; varianceFraction?: number | null };

/** The fixed method needs its N, the variance method its fraction. */
export function checkDimensionality(v: DimFields, ctx: z.RefinementCtx) {
  if (v.dimMethod === 'fixed' && (v.fixedComponents == null || Number.isNaN(v.fixedComponents))) {
    ctx.addIssue({ code: 'custom', path: ['fixedComponents'], message: 'Enter the number of components for the fixed method.' });
  }
  if (v.dimMethod === 'variance' && (v.varianceFraction == null || Number.isNaN(v.varianceFraction))) {
    ctx.addIssue({ code: 'custom', path: ['varianceFraction'], message: 'Enter the fraction of variance to keep, e.g. 0.9.' });
  }
}

export const studySchema = studyFields.superRefine(checkDimensionality);
export type StudyInput = z.input<typeof studySchema>;
export type StudyValues = z.output<typeof studySchema>;

export const studyUpdateSchema = studyFields.partial().superRefine(checkDimensionality);
export type StudyUpdate = z.output<typeof studyUpdateSchema>;

/** Defaults of a new study's protocol (blinding on, automatic dimensionality, normalisation on). */
export const STUDY_DEFAULTS: StudyValues = {
  name: '',
  description: '',
  ratersPerRun: 2,
  consensusRule: 'majority',
  allowUncertain: true,
  noiseKinds: [...NOISE_KIND_KEYS],
  blinding: true,
  showVotesAfterSubmit: true,
  dropVolumes: 0,
  dimMethod: 'iid-mdl',
  fixedComponents: null,
  varianceFraction: null,
  varianceNorm: true,
  detrend: false,
  reproducibilityThreshold: 0.8,
  lowReproducibility: 'flag',
};

export const studyIdParams = z.object({ id: z.coerce.number().int().positive({ message: 'Not a study number.' }) });

export const memberSchema = z.object({
  email: emailSchema,
  studyRole: z.enum(STUDY_ROLES, { message: 'Choose lead, rater or observer.' }),
});
export type MemberInput = z.input<typeof memberSchema>;

/** Most accounts the member picker lists at once (it says when there are more: type more of the name). */
export const ACCOUNT_SEARCH_LIMIT = 20;

/** GET /api/studies/:id/members/candidates?q= — part of a name or e-mail (2–100 characters). */
export const accountSearchSchema = z.object({
  q: z
    .string({ message: 'Type at least 2 letters of a name or e-mail.' })
    .trim()
    .min(2, { message: 'Type at least 2 letters of a name or e-mail.' })
    .max(100, { message: 'Use at most 100 characters.' }),
});

export const memberParams = studyIdParams.extend({
  userId: z.coerce.number().int().positive({ message: 'Not a user number.' }),
});
