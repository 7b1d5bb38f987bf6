/**
 * The desk's switch timing as User Timing entries (Performance API), at most one of each name at
 * a time, so nothing grows while a rater works for hours:
 * - mark `desk:switch` when a key (or click) asks for another component;
 * - measure `desk:app` from it to the moment React has committed the new component to the page
 *   (time courses, spectrum, features, strip);
 * - measure `desk:issued` from it to the moment the viewer has issued the new map's draw calls;
 * - measure `desk:painted` from it to the first frame the browser painted after that (map, time
 *   course and spectrum on screen).
 * `npm run bench -- desk` reads them with `performance.getEntriesByName`; the browser's own
 * performance panel shows them too. No test-only code: the same entries exist in every build.
 */
export const SWITCH_MARK = 'desk:switch';
export const SWITCH_MEASURES = { committed: 'desk:app', issued: 'desk:issued', painted: 'desk:painted' } as const;

export function markSwitch(): void {
  if (typeof performance === 'undefined' || !performance.mark) return;
  performance.clearMarks(SWITCH_MARK);
  performance.mark(SWITCH_MARK);
}

export function measureSwitch(phase: keyof typeof SWITCH_MEASURES): void {
  if (typeof performance === 'undefined' || !performance.measure) return;
  const name = SWITCH_MEASURES[phase];
  performance.clearMeasures(name);
  try {
    performance.measure(name, SWITCH_MARK);
  } catch {
    /* the mark was cleared (a newer switch began): nothing to measure */
  }
}
