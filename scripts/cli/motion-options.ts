// The motion-table options shared by the CLI commands that take one (decompose, denoise, import).
import { readFile } from 'node:fs/promises';
import { parseMotionFile, type MotionOrder, type MotionParams } from '@/lib/decomposition/motion';

export const MOTION_USAGE = '[--motion FILE [--motion-order trans-first|rot-first] [--motion-units radians|degrees]]';

/** parseArgs option entries: --motion FILE, --motion-order, --motion-units. */
export const motionOptions = {
  motion: { type: 'string' },
  'motion-order': { type: 'string', default: 'trans-first' },
  'motion-units': { type: 'string', default: 'radians' },
} as const;

type MotionValues = { motion?: string; 'motion-order'?: string; 'motion-units'?: string };

/** The stated column order and rotation units (parseMotionFile refuses other values clearly). */
export function motionFormat(values: MotionValues) {
  return { order: values['motion-order'] as MotionOrder, rotationUnits: values['motion-units'] as 'radians' | 'degrees' };
}

/** The --motion table for all volumes of a run of `rows` volumes, or undefined without --motion. */
export async function readMotionOption(values: MotionValues, rows: number): Promise<MotionParams | undefined> {
  if (!values.motion) return undefined;
  return parseMotionFile(await readFile(values.motion, 'utf8'), { ...motionFormat(values), expectedRows: rows });
}
