'use client';
import { TimecourseChart } from '@/components/charts/timecourse-chart';
import { SpectrumChart } from '@/components/charts/spectrum-chart';
import { MotionChart } from '@/components/charts/motion-chart';
import type { DeskComponent, DeskRun } from '@/lib/desk/types';

/** The component's time course (with the run's framewise displacement under it) and power spectrum. */
export function ChartsPanel({ run, component }: { run: DeskRun; component: DeskComponent }) {
  return (
    <div className="grid gap-2 md:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
      <figure className="rounded border border-line bg-ground-raised px-2 pt-1">
        <figcaption className="text-[11px] uppercase tracking-wider text-ink-muted">Time course · s</figcaption>
        <TimecourseChart values={component.timecourse} trSeconds={run.trSeconds} droppedVolumes={run.droppedVolumes} />
        {run.framewiseDisplacement ? (
          <>
            <p className="text-[11px] uppercase tracking-wider text-ink-muted">Framewise displacement · mm</p>
            <MotionChart fd={run.framewiseDisplacement} trSeconds={run.trSeconds} droppedVolumes={run.droppedVolumes} />
          </>
        ) : null}
      </figure>
      <figure className="rounded border border-line bg-ground-raised px-2 pt-1">
        <figcaption className="text-[11px] uppercase tracking-wider text-ink-muted">
          Power spectrum · Hz (to {(1 / (2 * run.trSeconds)).toFixed(2)} Hz; line at 0.1 Hz)
        </figcaption>
        <SpectrumChart frequencies={component.frequencies} power={component.spectrum} trSeconds={run.trSeconds} />
      </figure>
    </div>
  );
}
