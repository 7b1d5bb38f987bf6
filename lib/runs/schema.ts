/**
 * Zod schemas for uploads and run actions, shared by the upload area in the browser and the
 * route handlers. Uploads send one file per request as the raw body; the file name, the BIDS
 * entities and the options travel in the query string.
 */
import { z } from 'zod';
import { checkDimensionality, studyFields } from '@/lib/studies/schema';

/** A file name fit for display: no path separators, no control or odd characters. */
export const PLAIN_FILE_NAME = /^[A-Za-z0-9][A-Za-z0-9._+-]*$/;

/** What is wrong with a file name, in words, or null when it is fine. `kind` adds the extension rule. */
export function fileNameProblem(name: string, kind: 'image' | 'motion'): string | null {
  if (!name) return 'The file has no name. Give it a plain name such as sub-01_task-rest_bold.nii.gz.';
  if (name.length > 200) return `The file name is ${name.length} characters long; shorten it to at most 200.`;
  if (/[\\/]/.test(name))
    return `The file name "${printable(name)}" contains a path separator (/ or \\). Upload the file itself under a plain name such as sub-01_task-rest_bold.nii.gz.`;
  if (!PLAIN_FILE_NAME.test(name)) {
    return `The file name "${printable(name)}" contains characters other than letters, digits, ".", "_", "-" and "+" (or starts with one). Rename the file, e.g. sub-01_ses-1_task-rest_bold.nii.gz, and upload it again.`;
  }
  if (kind === 'image' && !/\.nii(\.gz)?$/i.test(name)) return `"${name}" does not end in .nii or .nii.gz. Upload a NIfTI image.`;
  return null;
}

/** The name with control characters shown as "?" so a message can quote it safely. */
function printable(name: string): string {
  return name.replace(/[\u0000-\u001f\u007f-\u009f]/g, '?').slice(0, 120);
}

const label = (entity: string) =>
  z
    .string()
    .trim()
    .max(64, { message: `The ${entity} label is at most 64 characters.` })
    .regex(/^[A-Za-z0-9]*$/, { message: `The ${entity} label may hold only letters and digits (no "${entity}-" prefix, no spaces).` });

/** BIDS entities of a run: sub is required, the others optional (empty = none). */
export const runEntitiesSchema = z.object({
  sub: label('subject').min(1, { message: 'Enter the subject label (the part after "sub-").' }),
  ses: label('session').optional().default(''),
  task: label('task').optional().default(''),
  acq: label('acquisition').optional().default(''),
  run: label('run').optional().default(''),
});

const fileName = (kind: 'image' | 'motion') =>
  z.string().superRefine((name, ctx) => {
    const problem = fileNameProblem(name, kind);
    if (problem) ctx.addIssue({ code: 'custom', message: problem });
  });

/** Query of POST /api/studies/:id/runs. `queue=true` queues the decomposition at once (no attachments coming). */
export const runUploadQuerySchema = runEntitiesSchema.extend({
  name: fileName('image'),
  queue: z
    .enum(['true', 'false'])
    .optional()
    .default('false')
    .transform((v) => v === 'true'),
});
export type RunUploadQuery = z.output<typeof runUploadQuerySchema>;

/** Query of PUT /api/runs/:id/mask. */
export const maskUploadQuerySchema = z.object({ name: fileName('image') });

export const MOTION_ORDERS = ['trans-first', 'rot-first'] as const;
export const MOTION_ORDER_NAMES: Record<(typeof MOTION_ORDERS)[number], string> = {
  'trans-first': 'tx ty tz rx ry rz (translations first)',
  'rot-first': 'rx ry rz tx ty tz (rotations first)',
};
/** The stored form of runs.motion_order. */
export const MOTION_ORDER_COLUMNS: Record<(typeof MOTION_ORDERS)[number], string> = {
  'trans-first': 'tx,ty,tz,rx,ry,rz',
  'rot-first': 'rx,ry,rz,tx,ty,tz',
};

/** Query of PUT /api/runs/:id/motion: column order and rotation units (translations are mm). */
export const motionUploadQuerySchema = z.object({
  name: fileName('motion'),
  order: z.enum(MOTION_ORDERS, { message: 'State the column order: trans-first or rot-first.' }),
  units: z.enum(['radians', 'degrees'], { message: 'State the rotation units: radians or degrees.' }),
});

export const runIdParams = z.object({ id: z.coerce.number().int().positive({ message: 'Not a run number.' }) });

/** Body of POST /api/runs/:id/queue: optional other decomposition settings (re-decompose). */
export const decomposeSettingsSchema = studyFields
  .pick({ dimMethod: true, fixedComponents: true, varianceFraction: true })
  .partial()
  .superRefine(checkDimensionality);
export type DecomposeSettings = z.output<typeof decomposeSettingsSchema>;

/** Query of DELETE /api/runs/:id: the second confirmation for a run that already has votes. */
export const deleteRunQuerySchema = z.object({
  confirmVotes: z
    .enum(['true', 'false'])
    .optional()
    .default('false')
    .transform((v) => v === 'true'),
});

/** The upload size limit in bytes: QUORUM_MAX_UPLOAD_MB (default 2048 MB). */
export function maxUploadBytes(env: Record<string, string | undefined> = process.env): number {
  const mb = Number(env.QUORUM_MAX_UPLOAD_MB ?? 2048);
  return Math.floor((Number.isFinite(mb) && mb > 0 ? mb : 2048) * 1024 * 1024);
}

/**
 * Largest image a header may describe (vox_offset + voxel data, uncompressed), from
 * QUORUM_MAX_IMAGE_MB (default 4096): the worker holds a run in memory to decompose it.
 */
export function maxImageBytes(env: Record<string, string | undefined> = process.env): number {
  const mb = Number(env.QUORUM_MAX_IMAGE_MB ?? 4096);
  return Math.floor((Number.isFinite(mb) && mb > 0 ? mb : 4096) * 1024 * 1024);
}

/** A motion table is small text: refuse more than this. */
export const MAX_MOTION_BYTES = 8 * 1024 * 1024;
/** Largest structural underlay accepted, as sent and as its header describes it (on a functional grid it is a few MB). */
export const MAX_STRUCTURAL_BYTES = 64 * 1024 * 1024;

export function formatBytes(n: number): string {
  if (n >= 1024 ** 3) return `${(n / 1024 ** 3).toFixed(1)} GB`;
  if (n >= 1024 ** 2) return `${(n / 1024 ** 2).toFixed(1)} MB`;
  if (n >= 1024) return `${(n / 1024).toFixed(1)} KB`;
  return `${n} bytes`;
}

/** The BIDS entities of a run as parsed (also the body of PATCH /api/runs/:id; empty = none). */
export type RunEntities = z.output<typeof runEntitiesSchema>;
