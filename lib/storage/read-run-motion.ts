/**
 * A run's motion parameters, read from its stored motion file, over the volumes the decomposition
 * kept: framewise displacement (mm), the three translations (mm) and the three rotations (degrees,
 * for reading); nulls without a motion file or when it cannot be read. Shared by the desk and Reconcile.
 */
import 'server-only';
import { readFile } from 'node:fs/promises';
import { dropInitialVolumes, framewiseDisplacement, parseMotionFile } from '@/lib/decomposition/motion';
import type { DeskRun } from '@/lib/desk/types';
import { pathFor } from './index';

type MotionSource = {
  runId: number;
  motionKey: string | null;
  motionOrder: string | null;
  motionRotationUnits: string | null;
  droppedVolumes: number;
};

const round = (v: number) => (Number.isFinite(v) ? Number(v.toPrecision(6)) : 0);

export async function readRunMotion(run: MotionSource): Promise<{ fd: number[] | null; motion: DeskRun['motion'] }> {
  if (!run.motionKey) return { fd: null, motion: null };
  try {
    const text = await readFile(pathFor(run.motionKey), 'utf8');
    const order = String(run.motionOrder ?? '')
      .trim()
      .toLowerCase()
      .startsWith('r')
      ? 'rot-first'
      : 'trans-first';
    const motion = parseMotionFile(text, { order, rotationUnits: run.motionRotationUnits === 'degrees' ? 'degrees' : 'radians' });
    const kept = run.droppedVolumes > 0 ? dropInitialVolumes(motion, run.droppedVolumes) : motion;
    const deg = 180 / Math.PI;
    return {
      fd: Array.from(framewiseDisplacement(kept), round),
      motion: {
        translations: kept.translations.map((c) => Array.from(c, round)),
        rotationsDeg: kept.rotations.map((c) => Array.from(c, (v) => round(v * deg))),
      },
    };
  } catch (err) {
    console.error(`[desk] motion parameters of run ${run.runId} unreadable:`, (err as Error).message);
    return { fd: null, motion: null };
  }
}
