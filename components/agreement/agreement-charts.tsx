'use client';

import { Bar, BarChart, CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { niceTicks, tickFormatter } from '@/components/charts/ticks';

const AXIS = { stroke: '#6b7583', fill: '#9aa4b2', fontSize: 11 };
const GRID = '#262d37';
const ACCENT = '#4fb8b0';
const tooltipStyle = { background: '#151a21', border: '1px solid #36404d', color: '#e4e8ee', fontSize: 12 };
const LEGEND = { fontSize: 11, color: '#9aa4b2' };
const SHARE_TICKS = niceTicks(0, 1, 5);
const AGREEMENT_TICKS = niceTicks(-0.2, 1, 7);
const percent = (v: number) => `${Math.round(100 * v)} %`;

export type RaterRate = { name: string; noiseRate: number | null; kappa: number | null };
export type WeekPoint = { week: string; alpha: number | null; percent: number | null; items: number };
export type Bin = { bin: string; runs: number };

/** Share of each rater's votes that are "noise": a rater far from the others stands out. */
export function NoiseRateChart({ data }: { data: RaterRate[] }) {
  return (
    <figure className="h-56" data-testid="noise-rate-chart">
      <figcaption className="text-xs text-ink-muted">Noise rate: share of each rater&apos;s votes that are &ldquo;noise&rdquo;</figcaption>
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 8, right: 8, bottom: 8, left: 0 }}>
          <CartesianGrid stroke={GRID} vertical={false} />
          <XAxis dataKey="name" tick={AXIS} />
          <YAxis domain={[0, 1]} ticks={SHARE_TICKS} tickFormatter={percent} tick={AXIS} width={48} />
          <Tooltip contentStyle={tooltipStyle} formatter={(v) => (typeof v === 'number' ? percent(v) : String(v))} />
          <Bar dataKey="noiseRate" name="noise rate" fill={ACCENT} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </figure>
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
          <YAxis domain={[-0.2, 1]} ticks={AGREEMENT_TICKS} tickFormatter={tickFormatter(AGREEMENT_TICKS)} tick={AXIS} />
          <Tooltip contentStyle={tooltipStyle} formatter={(v) => (typeof v === 'number' ? v.toFixed(3) : String(v))} />
          <Legend wrapperStyle={LEGEND} verticalAlign="top" height={22} />
          <Line dataKey="alpha" name="Krippendorff's α" stroke={ACCENT} dot isAnimationActive={false} connectNulls />
          <Line
            dataKey="percent"
            name="agreement (share of agreeing pairs)"
            stroke="#9aa4b2"
            strokeDasharray="4 3"
            dot={false}
            isAnimationActive={false}
            connectNulls
          />
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
          <Bar dataKey="runs" name="runs" fill={ACCENT} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}
