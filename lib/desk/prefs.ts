'use client';
import { useEffect, useState } from 'react';
import type { Sign } from './clusters';

/** The rater's view settings, kept in this browser (the desk and Reconcile share them). */
export type DeskPrefs = {
  threshold: number;
  layout: 'multiplanar' | 'mosaic';
  plane: 'axial' | 'coronal' | 'sagittal';
  autoAdvance: boolean;
  /** The six motion parameters under the time course. */
  showMotion: boolean;
  overlay: { visible: boolean; opacity: number; sign: Sign };
  /** The image under the map: the run's mean image, or the structural image a lead attached (when there is one). */
  underlay: 'mean' | 'structural';
};

const KEY = 'quorum.desk.prefs.v1';
export const DEFAULT_PREFS: DeskPrefs = {
  threshold: 2.0,
  layout: 'multiplanar',
  plane: 'axial',
  autoAdvance: false,
  showMotion: false,
  overlay: { visible: true, opacity: 1, sign: 'both' },
  underlay: 'mean',
};

function loadPrefs(): DeskPrefs {
  try {
    const stored = JSON.parse(localStorage.getItem(KEY) ?? '{}') as Partial<DeskPrefs>;
    return { ...DEFAULT_PREFS, ...stored, overlay: { ...DEFAULT_PREFS.overlay, ...stored.overlay, visible: true } };
  } catch {
    return DEFAULT_PREFS;
  }
}

/** The prefs, read after hydration (the server renders the defaults) and saved at each change. */
export function useDeskPrefs() {
  const [prefs, setPrefs] = useState<DeskPrefs>(DEFAULT_PREFS);
  // eslint-disable-next-line react-hooks/set-state-in-effect -- localStorage exists only after hydration; the server renders the defaults
  useEffect(() => setPrefs(loadPrefs()), []);
  useEffect(() => {
    try {
      localStorage.setItem(KEY, JSON.stringify(prefs));
    } catch {
      /* private mode */
    }
  }, [prefs]);
  return [prefs, setPrefs] as const;
}

const SIGNS: Sign[] = ['both', 'positive', 'negative'];
const PLANES: DeskPrefs['plane'][] = ['axial', 'coronal', 'sagittal'];
export const nextSign = (s: Sign): Sign => SIGNS[(SIGNS.indexOf(s) + 1) % SIGNS.length];
export const nextPlane = (p: DeskPrefs['plane']): DeskPrefs['plane'] => PLANES[(PLANES.indexOf(p) + 1) % PLANES.length];
/** Opacity in steps of 0.25 between 0.25 and 1. */
export const stepOpacity = (o: number, d: number) => Math.min(1, Math.max(0.25, Math.round((o + d * 0.25) * 4) / 4));
