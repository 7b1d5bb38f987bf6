'use client';
import { memo, useMemo } from 'react';
import type uPlot from 'uplot';
import { pearson } from '@/lib/decomposition/features';
import type { TimeRange } from './timecourse-chart';
import { UplotChart, niceAxis, niceRange, timesOf, timeWindow } from './uplot-chart';

const AXES = ['x', 'y', 'z'] as const;
const COLOURS = ['#e59a7a', '#8fc79a', '#8fb3e5'];

function Traces({
  title,
  unit,
  series,
  timecourse,
  trSeconds,
  droppedVolumes,
  range,
  testId,
}: {
  title: string;
  unit: string;
  series: number[][];
  timecourse: number[];
  trSeconds: number;
  droppedVolumes: number;
  range: TimeRange;
  testId: string;
}) {
  const n = series[0]?.length ?? 0;
  const times = useMemo(() => timesOf(n, trSeconds, droppedVolumes), [n, trSeconds, droppedVolumes]);
  const data = useMemo<uPlot.AlignedData>(() => [times, ...series.slice(0, 3)], [times, series]);
  const [from, to] = timeWindow(range, n, trSeconds, droppedVolumes);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      legend: { show: false },
      cursor: { show: false },
      padding: [2, 8, 0, 0],
      scales: { x: { time: false, auto: false, range: [from, to] }, y: { range: niceRange(3) } },
      axes: [{ show: false }, niceAxis({ count: 3, size: 44 })],
      series: [{}, ...AXES.map((_, i) => ({ stroke: COLOURS[i], width: 1, points: { show: false } }))],
    }),
    [from, to],
  );
  // correlation of each parameter with the component's time course (same kept volumes)
  const r = useMemo(() => series.map((s) => (s.length === timecourse.length ? pearson(s, timecourse) : null)), [series, timecourse]);
  return (
    <div data-testid={testId}>
      <p className="flex flex-wrap gap-x-3 text-[11px] text-ink-muted">
        <span className="uppercase tracking-wider">
          {title} · {unit}
        </span>
        {AXES.map((ax, i) => (
          <span key={ax} style={{ color: COLOURS[i] }} data-testid={`${testId}-r-${ax}`}>
            {ax} r {r[i] == null ? '—' : r[i]!.toFixed(2)}
          </span>
        ))}
      </p>
      <div role="img" aria-label={`${title} (${unit}) with their correlation to the time course`}>
        <UplotChart options={options} data={data} height={56} />
      </div>
    </div>
  );
}

/**
 * The run's six motion parameters on the time course's axis: translations x, y, z (mm) and
 * rotations about x, y, z (degrees), each with its Pearson correlation r to the component's time
 * course over the kept volumes ("—" when a parameter does not vary). Canvas charts (uPlot).
 */
export const MotionTraces = memo(function MotionTraces({
  motion,
  timecourse,
  trSeconds,
  droppedVolumes,
  range = null,
}: {
  motion: { translations: number[][]; rotationsDeg: number[][] };
  timecourse: number[];
  trSeconds: number;
  droppedVolumes: number;
  range?: TimeRange;
}) {
  const common = { timecourse, trSeconds, droppedVolumes, range };
  return (
    <div className="flex flex-col gap-1" data-testid="motion-traces">
      <Traces title="Translations" unit="mm" series={motion.translations} testId="motion-translations" {...common} />
      <Traces title="Rotations" unit="°" series={motion.rotationsDeg} testId="motion-rotations" {...common} />
    </div>
  );
});
