'use client';
import { memo, useMemo } from 'react';
import { Line, LineChart, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import { pearson } from '@/lib/decomposition/features';
import { CHART } from './theme';
import { niceTicks, tickFormatter } from './ticks';
import type { TimeRange } from './timecourse-chart';

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
  const data = useMemo(
    () => Array.from({ length: n }, (_, t) => ({ s: (droppedVolumes + t) * trSeconds, a: series[0][t], b: series[1][t], c: series[2][t] })),
    [series, n, trSeconds, droppedVolumes],
  );
  const domain: [number, number] = range ?? [0, (droppedVolumes + Math.max(n - 1, 0)) * trSeconds];
  const shown = useMemo(() => (range ? data.filter((d) => d.s >= range[0] && d.s <= range[1]) : data), [data, range]);
  const yTicks = useMemo(() => {
    const all = shown.flatMap((d) => [d.a, d.b, d.c]);
    return all.length ? niceTicks(Math.min(...all), Math.max(...all), 3) : [0, 1];
  }, [shown]);
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
      <div style={{ height: 56 }} role="img" aria-label={`${title} (${unit}) with their correlation to the time course`}>
        <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 600, height: 56 }}>
          <LineChart data={shown} margin={{ top: 2, right: 8, bottom: 0, left: -18 }}>
            <XAxis dataKey="s" type="number" domain={domain} allowDataOverflow hide />
            <YAxis
              domain={[yTicks[0] ?? 0, yTicks.at(-1) ?? 1]}
              ticks={yTicks}
              tick={CHART.tick}
              stroke={CHART.axis}
              width={44}
              tickFormatter={tickFormatter(yTicks)}
            />
            {(['a', 'b', 'c'] as const).map((k, i) => (
              <Line key={k} dataKey={k} stroke={COLOURS[i]} strokeWidth={1} dot={false} isAnimationActive={false} />
            ))}
          </LineChart>
        </ResponsiveContainer>
      </div>
    </div>
  );
}

/**
 * The run's six motion parameters on the time course's axis: translations x, y, z (mm) and
 * rotations about x, y, z (degrees), each with its Pearson correlation r to the component's time
 * course over the kept volumes ("—" when a parameter does not vary).
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
