'use client';
import { useState } from 'react';
import { TimecourseChart, type TimeRange } from '@/components/charts/timecourse-chart';
import { SpectrumChart } from '@/components/charts/spectrum-chart';
import { MotionChart } from '@/components/charts/motion-chart';
import { MotionTraces } from '@/components/charts/motion-traces';
import type { ComponentSeries, DeskRun } from '@/lib/desk/types';

/**
 * The component's time course (drag to zoom; the framewise displacement and, on request, the six
 * motion parameters under it on the same axis) and its power spectrum. `series` is null while the
 * desk's series payload is on its way: the charts' places are kept, saying so.
 */
export function ChartsPanel({
  run,
  series,
  showMotion,
  onShowMotion,
}: {
  run: DeskRun;
  series: ComponentSeries | null;
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
        {series ? <TimecourseChart values={series.timecourse} {...common} onRange={setRange} /> : <Waiting what="time course" />}
        {run.framewiseDisplacement ? (
          <>
            <p className="text-[11px] uppercase tracking-wider text-ink-muted">Framewise displacement · mm</p>
            <MotionChart fd={run.framewiseDisplacement} {...common} />
          </>
        ) : null}
        {run.motion && showMotion && series ? <MotionTraces motion={run.motion} timecourse={series.timecourse} {...common} /> : null}
      </figure>
      <figure className="rounded border border-line bg-ground-raised px-2 pt-1">
        <figcaption className="text-[11px] uppercase tracking-wider text-ink-muted">
          Power spectrum · Hz (to {(1 / (2 * run.trSeconds)).toFixed(2)} Hz; line at 0.1 Hz)
        </figcaption>
        {series ? (
          <SpectrumChart frequencies={series.frequencies} power={series.spectrum} trSeconds={run.trSeconds} />
        ) : (
          <Waiting what="power spectrum" />
        )}
      </figure>
    </div>
  );
}

/** A chart's place (the charts' height) while its data is on its way. */
function Waiting({ what }: { what: string }) {
  return (
    <p className="flex h-[150px] items-center justify-center text-xs text-ink-muted" data-testid="series-loading">
      Loading the {what}…
    </p>
  );
}
