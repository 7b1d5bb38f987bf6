'use client';
import { useEffect, useLayoutEffect, useRef } from 'react';
import uPlot, { type AlignedData, type Options } from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { CHART } from './theme';
import { niceTicks, tickFormatter } from './ticks';

export const FONT = '10px ui-monospace, SFMono-Regular, Menlo, monospace';

/** Acquisition times (s) of the kept volumes: (dropped + t) · TR. */
export function timesOf(n: number, trSeconds: number, droppedVolumes: number): number[] {
  return Array.from({ length: n }, (_, t) => (droppedVolumes + t) * trSeconds);
}

/**
 * The time axis's window in seconds: the rater's range, or from 0 s (the dropped volumes' band
 * included) to the last kept volume; never narrower than one TR.
 */
export function timeWindow(range: [number, number] | null, n: number, trSeconds: number, droppedVolumes: number): [number, number] {
  const from = range ? range[0] : 0;
  const to = range ? range[1] : (droppedVolumes + Math.max(n - 1, 0)) * trSeconds;
  return [from, Math.max(to, from + trSeconds)];
}

/** An axis in the product's style whose ticks are `niceTicks` and whose labels never repeat (ticks.ts). */
export function niceAxis(opts: { count: number; size?: number; label?: string; show?: boolean }): uPlot.Axis {
  let labels: (v: number) => string = String;
  return {
    show: opts.show ?? true,
    stroke: CHART.tick.fill,
    font: FONT,
    labelFont: FONT,
    label: opts.label,
    labelSize: opts.label ? 14 : 0,
    labelGap: 0,
    size: opts.size ?? 44,
    gap: 3,
    ticks: { stroke: CHART.axis, width: 1, size: 4 },
    grid: { stroke: CHART.grid, width: 1 },
    splits: (_u, _axis, min, max) => {
      const ticks = niceTicks(min, max, opts.count).filter(
        (v) => v >= min - 1e-9 * Math.abs(max - min) && v <= max + 1e-9 * Math.abs(max - min),
      );
      labels = tickFormatter(ticks);
      return ticks;
    },
    values: (_u, splits) => splits.map((v) => labels(v)),
  };
}

/** Scale range from niceTicks (so the first and last tick sit on the plot's edges). */
export function niceRange(count: number): uPlot.Range.Function {
  return (_u, min, max) => {
    if (min == null || max == null || !Number.isFinite(min) || !Number.isFinite(max)) return [0, 1];
    const t = niceTicks(min, max, count);
    return [t[0] ?? min, t.at(-1) ?? max];
  };
}

/**
 * A canvas chart (uPlot) that fills its container's width. The plot is made once per `options`
 * (memoise them) and gets new series with `setData` — a few milliseconds for 1,200 points, where
 * an SVG chart rebuilt its whole element tree on every component.
 */
export function UplotChart({
  options,
  data,
  height,
  onReady,
}: {
  options: Omit<Options, 'width' | 'height'>;
  data: AlignedData;
  height: number;
  onReady?: (u: uPlot | null) => void;
}) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const dataRef = useRef(data);
  const readyRef = useRef(onReady);
  useLayoutEffect(() => {
    dataRef.current = data;
    readyRef.current = onReady;
  });

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const u = new uPlot({ ...options, width: Math.max(120, el.clientWidth), height }, dataRef.current, el);
    plot.current = u;
    readyRef.current?.(u);
    const ro = new ResizeObserver(() => {
      const w = Math.max(120, el.clientWidth);
      if (w !== u.width) u.setSize({ width: w, height });
    });
    ro.observe(el);
    return () => {
      ro.disconnect();
      readyRef.current?.(null);
      u.destroy();
      plot.current = null;
    };
  }, [options, height]);

  useEffect(() => {
    const u = plot.current;
    if (u && u.data !== data) u.setData(data);
  }, [data]);

  return <div ref={box} className="w-full" style={{ height }} />;
}
