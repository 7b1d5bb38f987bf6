/**
 * Zod schemas of the calibration set: route addresses and the lead's actions (mark a run, set or
 * adopt reference labels, assign a rater, certify), shared by the calibration page and the route
 * handlers under app/api/studies/:id/calibration.
 */
import { z } from 'zod';

const id = (what: string) =>
  z.coerce
    .number({ message: `Choose ${what}.` })
    .int({ message: `Choose ${what}.` })
    .positive({ message: `Choose ${what}.` });

/** /api/studies/:id/calibration… */
export const studyParamsSchema = z.object({ id: id('a study') });
/** /api/studies/:id/calibration/runs/:runId/… */
export const calibrationRunParamsSchema = studyParamsSchema.extend({ runId: id('a run') });

/** POST /api/studies/:id/calibration/runs — mark a ready run of the study as a calibration run. */
export const markRunSchema = z.object({ runId: id('a run') }).strict();

/** POST …/runs/:runId/references — adopt the run's decisions as reference, or set one component's reference label. */
export const adoptReferencesSchema = z.object({ adopt: z.literal(true) }).strict();
export const setReferenceSchema = z
  .object({
    componentId: id('a component'),
    label: z.string().trim().min(1, { message: 'Choose a label.' }).max(32),
    noiseKind: z
      .string()
      .trim()
      .max(32)
      .nullable()
      .optional()
      .transform((v) => v || null),
  })
  .strict();
export const referenceSchema = z.union([adoptReferencesSchema, setReferenceSchema]);

/** POST …/runs/:runId/raters — give a rater an assignment on the calibration run (rated in the normal desk). */
export const assignCalibrationSchema = z.object({ raterId: id('a rater') }).strict();

/** POST /api/studies/:id/calibration/certifications — the lead's verdict on a rater (scores stored with it). */
export const certifySchema = z.object({ userId: id('a rater'), passed: z.boolean({ message: 'Say whether the rater passed.' }) }).strict();

const share = (what: string) =>
  z
    .number({ message: `${what}: a number from 0 to 1, or null for no threshold.` })
    .min(0, { message: `${what} is at least 0.` })
    .max(1, { message: `${what} is at most 1.` })
    .nullable();

/**
 * PUT /api/studies/:id/calibration/threshold — what a rater must reach on the calibration set before
 * live runs; optionally the set's name (empty: unnamed) and re-calibration every N weeks (null: none).
 * Left out, the name and the interval stay as they are.
 */
export const calibrationThresholdSchema = z
  .object({
    minAc1: share('Minimum AC1'),
    minSensitivity: share('Minimum noise sensitivity'),
    setName: z
      .string({ message: 'The calibration set’s name is text.' })
      .trim()
      .max(80, { message: 'Name the calibration set in at most 80 characters.' })
      .nullable()
      .optional()
      .transform((v) => (v === undefined ? undefined : v || null)),
    recalibrationWeeks: z
      .number({ message: 'Re-calibration: a whole number of weeks from 1 to 104, or null for none.' })
      .int({ message: 'Re-calibration: a whole number of weeks from 1 to 104, or null for none.' })
      .min(1, { message: 'Re-calibration: at least every week.' })
      .max(104, { message: 'Re-calibration: at most every 104 weeks.' })
      .nullable()
      .optional(),
  })
  .strict();
