'use client';
import { memo, useMemo, useState } from 'react';
import { CartesianGrid, Line, LineChart, ReferenceArea, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { CHART } from './theme';
import { niceTicks, tickFormatter } from './ticks';

/** A time range in seconds of acquisition time (null: the whole run). */
export type TimeRange = [number, number] | null;

type Point = { s: number; v: number; vol: number };

function HoverBox({ active, payload }: { active?: boolean; payload?: { payload: Point }[] }) {
  const p = active ? payload?.[0]?.payload : undefined;
  if (!p) return null;
  return (
    <div className="rounded border border-line-strong bg-ground-raised px-2 py-1 font-mono text-[11px] text-ink" data-testid="timecourse-hover">
      volume {p.vol} · {p.s.toFixed(1)} s · {p.v.toFixed(3)}
    </div>
  );
}

/**
 * A component's time course against acquisition time: x = (dropped volumes + t) · TR seconds.
 * The dropped initial volumes are a grey band from 0 s; hovering shows the volume index (0-based,
 * counted from the first acquired volume) and its time; dragging across the chart zooms to that
 * range (`range`/`onRange`, shared with the motion traces below it).
 */
export const TimecourseChart = memo(function TimecourseChart({
  values,
  trSeconds,
  droppedVolumes,
  range = null,
  onRange,
  height = 150,
}: {
  values: number[];
  trSeconds: number;
  droppedVolumes: number;
  range?: TimeRange;
  onRange?: (r: TimeRange) => void;
  height?: number;
}) {
  const data = useMemo<Point[]>(() => values.map((v, t) => ({ s: (droppedVolumes + t) * trSeconds, v, vol: droppedVolumes + t })), [values, trSeconds, droppedVolumes]);
  const end = (droppedVolumes + Math.max(values.length - 1, 0)) * trSeconds;
  const domain = useMemo<[number, number]>(() => range ?? [0, end], [range, end]);
  const shown = useMemo(() => (range ? data.filter((d) => d.s >= range[0] && d.s <= range[1]) : data), [data, range]);
  const yTicks = useMemo(() => (shown.length ? niceTicks(Math.min(...shown.map((d) => d.v)), Math.max(...shown.map((d) => d.v)), 4) : [0, 1]), [shown]);
  const xTicks = useMemo(() => niceTicks(domain[0], domain[1], 6).filter((s) => s >= domain[0] - 1e-9 && s <= domain[1] + 1e-9), [domain]);
  const [drag, setDrag] = useState<{ a: number; b: number } | null>(null);
  const finish = () => {
    if (drag && onRange && Math.abs(drag.b - drag.a) >= 2 * trSeconds) onRange([Math.min(drag.a, drag.b), Math.max(drag.a, drag.b)]);
    setDrag(null);
  };
  return (
    <div style={{ height }} data-testid="timecourse-chart" data-range={range ? `${range[0].toFixed(1)}-${range[1].toFixed(1)}` : ''} aria-label="Time course" role="img" className="select-none">
      <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 600, height }}>
        <LineChart
          data={shown}
          margin={{ top: 6, right: 8, bottom: 0, left: -18 }}
          onMouseDown={(e) => {
            const s = Number(e?.activeLabel);
            if (onRange && Number.isFinite(s)) setDrag({ a: s, b: s });
          }}
          onMouseMove={(e) => {
            const s = Number(e?.activeLabel);
            if (drag && Number.isFinite(s)) setDrag({ ...drag, b: s });
          }}
          onMouseUp={finish}
          onMouseLeave={() => setDrag(null)}
        >
          <CartesianGrid stroke={CHART.grid} vertical={false} />
          {droppedVolumes > 0 && domain[0] < droppedVolumes * trSeconds ? (
            <ReferenceArea x1={domain[0]} x2={droppedVolumes * trSeconds} fill={CHART.axis} fillOpacity={0.25} ifOverflow="hidden" label={{ value: 'dropped', fill: CHART.tick.fill, fontSize: 9, position: 'insideTop' }} />
          ) : null}
          <XAxis
            dataKey="s"
            type="number"
            domain={domain}
            ticks={xTicks}
            allowDataOverflow
            tick={CHART.tick}
            stroke={CHART.axis}
            tickFormatter={tickFormatter(xTicks)}
            unit=" s"
          />
          <YAxis
            domain={[yTicks[0] ?? 0, yTicks.at(-1) ?? 1]}
            ticks={yTicks}
            tick={CHART.tick}
            stroke={CHART.axis}
            width={44}
            tickFormatter={tickFormatter(yTicks)}
          />
          <Tooltip content={<HoverBox />} isAnimationActive={false} cursor={{ stroke: CHART.reference, strokeWidth: 1 }} />
          {drag ? <ReferenceArea x1={drag.a} x2={drag.b} fill={CHART.reference} fillOpacity={0.2} /> : null}
          <Line dataKey="v" stroke={CHART.trace} strokeWidth={1.25} dot={false} isAnimationActive={false} />
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
});
