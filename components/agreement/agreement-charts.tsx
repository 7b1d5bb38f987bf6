'use client';

import { Bar, BarChart, CartesianGrid, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';

const AXIS = { stroke: '#6b7583', fill: '#9aa4b2', fontSize: 11 };
const GRID = '#262d37';
const ACCENT = '#4fb8b0';
const tooltipStyle = { background: '#151a21', border: '1px solid #36404d', color: '#e4e8ee', fontSize: 12 };

export type RaterRate = { name: string; noiseRate: number | null; kappa: number | null };
export type WeekPoint = { week: string; alpha: number | null; percent: number | null; items: number };
export type Bin = { bin: string; runs: number };

/** Share of each rater's votes that are "noise": a rater far from the others stands out. */
export function NoiseRateChart({ data }: { data: RaterRate[] }) {
  return (
    <div className="h-56" data-testid="noise-rate-chart">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 8, right: 8, bottom: 8, left: 0 }}>
          <CartesianGrid stroke={GRID} vertical={false} />
          <XAxis dataKey="name" tick={AXIS} />
          <YAxis domain={[0, 1]} tick={AXIS} />
          <Tooltip contentStyle={tooltipStyle} formatter={(v) => (typeof v === 'number' ? v.toFixed(3) : String(v))} />
          <Bar dataKey="noiseRate" name="noise rate" fill={ACCENT} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}

/** Agreement by week of voting. */
export function WeeklyChart({ data }: { data: WeekPoint[] }) {
  return (
    <div className="h-56" data-testid="weekly-chart">
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={{ top: 8, right: 8, bottom: 8, left: 0 }}>
          <CartesianGrid stroke={GRID} vertical={false} />
          <XAxis dataKey="week" tick={AXIS} />
          <YAxis domain={[-0.2, 1]} tick={AXIS} />
          <Tooltip contentStyle={tooltipStyle} formatter={(v) => (typeof v === 'number' ? v.toFixed(3) : String(v))} />
          <Line dataKey="alpha" name="α" stroke={ACCENT} dot isAnimationActive={false} connectNulls />
          <Line dataKey="percent" name="percent agreement" stroke="#9aa4b2" strokeDasharray="4 3" dot={false} isAnimationActive={false} connectNulls />
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}

/** Distribution of per-run agreement (α) as a histogram. */
export function RunHistogram({ data }: { data: Bin[] }) {
  return (
    <div className="h-48" data-testid="run-histogram">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 8, right: 8, bottom: 8, left: 0 }}>
          <CartesianGrid stroke={GRID} vertical={false} />
          <XAxis dataKey="bin" tick={AXIS} />
          <YAxis allowDecimals={false} tick={AXIS} />
          <Tooltip contentStyle={tooltipStyle} />
          <Bar dataKey="runs" fill={ACCENT} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}
