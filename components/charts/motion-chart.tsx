'use client';
import { memo, useMemo } from 'react';
import type uPlot from 'uplot';
import { CHART } from './theme';
import { niceTicks } from './ticks';
import type { TimeRange } from './timecourse-chart';
import { UplotChart, niceAxis, timesOf, timeWindow } from './uplot-chart';

/** Framewise displacement (mm) of the run on the same time axis as the time course (a canvas chart, uPlot). */
export const MotionChart = memo(function MotionChart({
  fd,
  trSeconds,
  droppedVolumes,
  range = null,
  height = 56,
}: {
  fd: number[];
  trSeconds: number;
  droppedVolumes: number;
  range?: TimeRange;
  height?: number;
}) {
  const times = useMemo(() => timesOf(fd.length, trSeconds, droppedVolumes), [fd.length, trSeconds, droppedVolumes]);
  const data = useMemo<uPlot.AlignedData>(() => [times, fd], [times, fd]);
  const [from, to] = timeWindow(range, fd.length, trSeconds, droppedVolumes);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      legend: { show: false },
      cursor: { show: false },
      padding: [2, 8, 0, 0],
      scales: {
        x: { time: false, auto: false, range: [from, to] },
        // from 0, two or three ticks with labels that never repeat (a fixed one decimal read "0.0 0.0" on a still run)
        y: {
          range: (_u, _min, max) => {
            const t = niceTicks(0, Math.max(0, Number.isFinite(max) ? max : 0), 2);
            return [t[0] ?? 0, t.at(-1) ?? 1];
          },
        },
      },
      axes: [{ show: false }, niceAxis({ count: 2, size: 44 })],
      series: [{}, { stroke: CHART.fd, fill: `${CHART.fd}40`, width: 1, points: { show: false } }],
    }),
    [from, to],
  );
  return (
    <div data-testid="motion-chart" aria-label="Framewise displacement" role="img">
      <UplotChart options={options} data={data} height={height} />
    </div>
  );
});
