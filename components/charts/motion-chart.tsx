'use client';
import { memo, useMemo } from 'react';
import { Area, AreaChart, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import { CHART } from './theme';
import { niceTicks, tickFormatter } from './ticks';
import type { TimeRange } from './timecourse-chart';

/** Framewise displacement (mm) of the run on the same time axis as the time course. */
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
  const data = useMemo(() => fd.map((v, t) => ({ s: (droppedVolumes + t) * trSeconds, v })), [fd, trSeconds, droppedVolumes]);
  const end = (droppedVolumes + Math.max(fd.length - 1, 0)) * trSeconds;
  const domain: [number, number] = range ?? [0, end];
  const shown = useMemo(() => (range ? data.filter((d) => d.s >= range[0] && d.s <= range[1]) : data), [data, range]);
  // two or three ticks from 0 with labels that never repeat (a fixed one decimal read "0.0 0.0" on a still run)
  const yTicks = useMemo(() => niceTicks(0, Math.max(0, ...shown.map((d) => d.v)), 2), [shown]);
  return (
    <div style={{ height }} data-testid="motion-chart" aria-label="Framewise displacement" role="img">
      <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 600, height }}>
        <AreaChart data={shown} margin={{ top: 2, right: 8, bottom: 0, left: -18 }}>
          <XAxis dataKey="s" type="number" domain={domain} allowDataOverflow hide />
          <YAxis
            domain={[yTicks[0] ?? 0, yTicks.at(-1) ?? 1]}
            ticks={yTicks}
            tick={CHART.tick}
            stroke={CHART.axis}
            width={44}
            tickFormatter={tickFormatter(yTicks)}
          />
          <Area dataKey="v" stroke={CHART.fd} fill={CHART.fd} fillOpacity={0.25} strokeWidth={1} isAnimationActive={false} />
        </AreaChart>
      </ResponsiveContainer>
    </div>
  );
});
