'use client';
import { memo, useLayoutEffect, useMemo, useRef, useState } from 'react';
import type uPlot from 'uplot';
import { CHART } from './theme';
import { UplotChart, niceAxis, niceRange, timesOf, timeWindow } from './uplot-chart';

/** A time range in seconds of acquisition time (null: the whole run). */
export type TimeRange = [number, number] | null;

/**
 * A component's time course against acquisition time: x = (dropped volumes + t) · TR seconds.
 * The dropped initial volumes are a grey band from 0 s; hovering shows the volume index (0-based,
 * counted from the first acquired volume) and its time; dragging across the chart zooms to that
 * range (`range`/`onRange`, shared with the motion traces below it). Drawn on a canvas (uPlot):
 * a new component only replaces the series.
 */
export const TimecourseChart = memo(function TimecourseChart({
  values,
  trSeconds,
  droppedVolumes,
  range = null,
  onRange,
  height = 150,
}: {
  values: ArrayLike<number>;
  trSeconds: number;
  droppedVolumes: number;
  range?: TimeRange;
  onRange?: (r: TimeRange) => void;
  height?: number;
}) {
  const n = values.length;
  const [from, to] = timeWindow(range, n, trSeconds, droppedVolumes);
  const times = useMemo(() => timesOf(n, trSeconds, droppedVolumes), [n, trSeconds, droppedVolumes]);
  const data = useMemo<uPlot.AlignedData>(() => [times, values as number[]], [times, values]);
  const [hover, setHover] = useState<number | null>(null);
  const onRangeRef = useRef(onRange);
  useLayoutEffect(() => {
    onRangeRef.current = onRange;
  });

  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      legend: { show: false },
      padding: [6, 8, 0, 0],
      cursor: {
        y: false,
        points: { show: false },
        drag: { x: true, y: false, setScale: false },
      },
      select: { show: true, left: 0, top: 0, width: 0, height: 0 },
      scales: { x: { time: false, auto: false, range: [from, to] }, y: { range: niceRange(4) } },
      axes: [niceAxis({ count: 6, size: 26 }), niceAxis({ count: 4, size: 44 })],
      series: [{}, { stroke: CHART.trace, width: 1.25, points: { show: false } }],
      hooks: {
        drawAxes: [
          (u) => {
            if (droppedVolumes <= 0) return;
            const x0 = u.valToPos(Math.max(from, 0), 'x', true);
            const x1 = u.valToPos(Math.min(droppedVolumes * trSeconds, to), 'x', true);
            if (x1 <= x0) return;
            u.ctx.save();
            u.ctx.fillStyle = CHART.axis;
            u.ctx.globalAlpha = 0.25;
            u.ctx.fillRect(x0, u.bbox.top, x1 - x0, u.bbox.height);
            u.ctx.restore();
          },
        ],
        setCursor: [(u) => setHover(u.cursor.idx ?? null)],
        setSelect: [
          (u) => {
            const { left, width } = u.select;
            if (width <= 0) return;
            const a = u.posToVal(left, 'x');
            const b = u.posToVal(left + width, 'x');
            u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
            if (onRangeRef.current && b - a >= 2 * trSeconds) onRangeRef.current([a, b]);
          },
        ],
      },
    }),
    [from, to, trSeconds, droppedVolumes],
  );
  const i = hover != null && hover >= 0 && hover < n ? hover : null;
  return (
    <div
      className="relative select-none"
      data-testid="timecourse-chart"
      data-range={range ? `${range[0].toFixed(1)}-${range[1].toFixed(1)}` : ''}
      aria-label={`Time course over ${n} volumes of ${trSeconds} s`}
      role="img"
    >
      <UplotChart options={options} data={data} height={height} />
      {i != null ? (
        <div
          className="pointer-events-none absolute right-2 top-1 rounded border border-line-strong bg-ground-raised px-2 py-1 font-mono text-[11px] text-ink"
          data-testid="timecourse-hover"
        >
          volume {droppedVolumes + i} · {((droppedVolumes + i) * trSeconds).toFixed(1)} s · {Number(values[i]).toFixed(3)}
        </div>
      ) : null}
    </div>
  );
});
