'use client';
import { useState } from 'react';
import { TimecourseChart, type TimeRange } from '@/components/charts/timecourse-chart';
import { SpectrumChart } from '@/components/charts/spectrum-chart';
import { MotionChart } from '@/components/charts/motion-chart';
import { MotionTraces } from '@/components/charts/motion-traces';
import type { DeskComponent, DeskRun } from '@/lib/desk/types';

/**
 * The component's time course (drag to zoom; the framewise displacement and, on request, the six
 * motion parameters under it on the same axis) and its power spectrum.
 */
export function ChartsPanel({
  run,
  component,
  showMotion,
  onShowMotion,
}: {
  run: DeskRun;
  component: DeskComponent;
  showMotion: boolean;
  onShowMotion: (on: boolean) => void;
}) {
  const [range, setRange] = useState<TimeRange>(null);
  const common = { trSeconds: run.trSeconds, droppedVolumes: run.droppedVolumes, range };
  return (
    <div className="grid gap-2 md:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
      <figure className="rounded border border-line bg-ground-raised px-2 pt-1">
        <figcaption className="flex flex-wrap items-center gap-x-3 text-[11px] text-ink-muted">
          <span className="uppercase tracking-wider">Time course · s</span>
          <span>drag across to zoom</span>
          {range ? (
            <button
              type="button"
              onClick={() => setRange(null)}
              className="rounded border border-line-strong px-1.5 text-ink"
              data-testid="timecourse-reset"
            >
              whole run
            </button>
          ) : null}
          {run.motion ? (
            <label className="ml-auto flex items-center gap-1">
              <input
                type="checkbox"
                checked={showMotion}
                onChange={(e) => onShowMotion(e.target.checked)}
                className="accent-lumen"
                data-testid="motion-toggle"
              />
              motion parameters
            </label>
          ) : null}
        </figcaption>
        <TimecourseChart values={component.timecourse} {...common} onRange={setRange} />
        {run.framewiseDisplacement ? (
          <>
            <p className="text-[11px] uppercase tracking-wider text-ink-muted">Framewise displacement · mm</p>
            <MotionChart fd={run.framewiseDisplacement} {...common} />
          </>
        ) : null}
        {run.motion && showMotion ? <MotionTraces motion={run.motion} timecourse={component.timecourse} {...common} /> : null}
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
