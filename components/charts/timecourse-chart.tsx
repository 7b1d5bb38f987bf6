'use client';
import { memo, useMemo } from 'react';
import { CartesianGrid, Line, LineChart, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import { CHART } from './theme';
import { niceTicks, tickFormatter } from './ticks';

/**
 * A component's time course against acquisition time: x = (dropped volumes + t) · TR seconds.
 */
export const TimecourseChart = memo(function TimecourseChart({
  values,
  trSeconds,
  droppedVolumes,
  height = 150,
}: {
  values: number[];
  trSeconds: number;
  droppedVolumes: number;
  height?: number;
}) {
  const data = useMemo(() => values.map((v, t) => ({ s: (droppedVolumes + t) * trSeconds, v })), [values, trSeconds, droppedVolumes]);
  const end = (droppedVolumes + Math.max(values.length - 1, 0)) * trSeconds;
  const yTicks = useMemo(() => (values.length ? niceTicks(Math.min(...values), Math.max(...values), 4) : [0, 1]), [values]);
  return (
    <div style={{ height }} data-testid="timecourse-chart" aria-label="Time course" role="img">
      <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 600, height }}>
        <LineChart data={data} margin={{ top: 6, right: 8, bottom: 0, left: -18 }}>
          <CartesianGrid stroke={CHART.grid} vertical={false} />
          <XAxis
            dataKey="s"
            type="number"
            domain={[droppedVolumes * trSeconds, end]}
            tick={CHART.tick}
            stroke={CHART.axis}
            tickFormatter={(s: number) => `${Math.round(s)}`}
            unit=" s"
            allowDecimals={false}
          />
          <YAxis
            domain={[yTicks[0] ?? 0, yTicks.at(-1) ?? 1]}
            ticks={yTicks}
            tick={CHART.tick}
            stroke={CHART.axis}
            width={44}
            tickFormatter={tickFormatter(yTicks)}
          />
          <Line dataKey="v" stroke={CHART.trace} strokeWidth={1.25} dot={false} isAnimationActive={false} />
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
});
