'use client';
import { memo, useMemo } from 'react';
import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import { CHART } from './theme';

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
  return (
    <div style={{ height }} data-testid="spectrum-chart" aria-label="Power spectrum" role="img">
      <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 300, height }}>
        <LineChart data={data} margin={{ top: 6, right: 10, bottom: 0, left: -18 }}>
          <CartesianGrid stroke={CHART.grid} vertical={false} />
          <XAxis
            dataKey="f"
            type="number"
            domain={[0, nyquist]}
            ticks={[0, nyquist / 2, nyquist]}
            tick={CHART.tick}
            stroke={CHART.axis}
            tickFormatter={(f: number) => f.toFixed(2)}
            unit=" Hz"
          />
          <YAxis tick={CHART.tick} stroke={CHART.axis} width={44} tickFormatter={(v: number) => (v >= 100 ? v.toExponential(0) : v.toFixed(1))} />
          <ReferenceLine x={0.1} stroke={CHART.reference} strokeDasharray="3 3" label={{ value: '0.1 Hz', position: 'insideTopRight', fill: CHART.reference, fontSize: 10 }} />
          <Line dataKey="p" stroke={CHART.trace} strokeWidth={1.25} dot={false} isAnimationActive={false} />
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
});
