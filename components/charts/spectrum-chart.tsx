'use client';
import { memo, useMemo } from 'react';
import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import { CHART } from './theme';
import { niceTicks, tickFormatter } from './ticks';

/**
 * A component's power spectrum in Hz, from 0 to the Nyquist limit 1/(2·TR), with a reference
 * line at 0.1 Hz (above it, power is more often physiological or scanner noise).
 */
export const SpectrumChart = memo(function SpectrumChart({
  frequencies,
  power,
  trSeconds,
  height = 150,
}: {
  frequencies: number[];
  power: number[];
  trSeconds: number;
  height?: number;
}) {
  const nyquist = 1 / (2 * trSeconds);
  const data = useMemo(() => frequencies.map((f, i) => ({ f, p: power[i] ?? 0 })), [frequencies, power]);
  const yTicks = useMemo(() => niceTicks(0, Math.max(0, ...power), 4), [power]);
  const xTicks = useMemo(() => niceTicks(0, nyquist, 6).filter((f) => f <= nyquist + 1e-9), [nyquist]);
  return (
    <div style={{ height }} data-testid="spectrum-chart" aria-label="Power spectrum" role="img">
      <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 300, height }}>
        <LineChart data={data} margin={{ top: 6, right: 10, bottom: 0, left: -18 }}>
          <CartesianGrid stroke={CHART.grid} vertical={false} />
          <XAxis
            dataKey="f"
            type="number"
            domain={[0, nyquist]}
            ticks={xTicks}
            tick={CHART.tick}
            stroke={CHART.axis}
            tickFormatter={tickFormatter(xTicks)}
            unit=" Hz"
          />
          <YAxis
            domain={[yTicks[0] ?? 0, yTicks.at(-1) ?? 1]}
            ticks={yTicks}
            tick={CHART.tick}
            stroke={CHART.axis}
            width={52}
            tickFormatter={tickFormatter(yTicks)}
            label={{ value: 'power (a.u.²/Hz)', angle: -90, position: 'insideLeft', fill: CHART.reference, fontSize: 10, dx: 14, dy: 40 }}
          />
          <ReferenceLine x={0.1} stroke={CHART.reference} strokeDasharray="3 3" label={{ value: '0.1 Hz', position: 'insideTopRight', fill: CHART.reference, fontSize: 10 }} />
          <ReferenceLine x={nyquist} stroke={CHART.reference} label={{ value: `Nyquist ${nyquist.toFixed(3)} Hz`, position: 'insideTopLeft', fill: CHART.reference, fontSize: 10 }} />
          <Line dataKey="p" stroke={CHART.trace} strokeWidth={1.25} dot={false} isAnimationActive={false} />
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
});
