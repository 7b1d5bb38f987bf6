import type { ComponentsPayload, DeskPagePayload } from './types';

/** The desk page's payload from the run's components: the series of the shown component only (index into the list). */
export function deskPagePayload({ run, components }: ComponentsPayload, shown: number): DeskPagePayload {
  const c = components[shown];
  return {
    run,
    components: components.map(({ id, idx, varianceExplained, features }) => ({ id, idx, varianceExplained, features })),
    shown: c ? { id: c.id, timecourse: c.timecourse, spectrum: c.spectrum, frequencies: c.frequencies } : null,
  };
}
