'use client';
import { memo, useMemo } from 'react';
import type uPlot from 'uplot';
import { CHART } from './theme';
import { FONT, UplotChart, niceAxis, niceRange } from './uplot-chart';

/** A dashed or solid vertical line at frequency `f` with a label beside it, inside the plot area. */
function referenceLine(u: uPlot, f: number, text: string, dashed: boolean, side: 'left' | 'right') {
  const ctx = u.ctx;
  const x = Math.round(u.valToPos(f, 'x', true));
  const { top, height, left, width } = u.bbox;
  if (x < left - 1 || x > left + width + 1) return;
  ctx.save();
  ctx.strokeStyle = CHART.reference;
  ctx.lineWidth = 1;
  ctx.setLineDash(dashed ? [3, 3] : []);
  ctx.beginPath();
  ctx.moveTo(x + 0.5, top);
  ctx.lineTo(x + 0.5, top + height);
  ctx.stroke();
  const pr = uPlotRatio();
  ctx.font = FONT.replace('10px', `${10 * pr}px`);
  ctx.fillStyle = CHART.reference;
  ctx.textBaseline = 'top';
  ctx.textAlign = side === 'left' ? 'right' : 'left';
  ctx.fillText(text, x + (side === 'left' ? -3 : 3) * pr, top + 2 * pr);
  ctx.restore();
}

const uPlotRatio = () => (typeof devicePixelRatio === 'number' ? devicePixelRatio : 1);

/**
 * A component's power spectrum in Hz, from 0 to the Nyquist limit 1/(2·TR), with a dashed line at
 * 0.1 Hz (above it, power is more often physiological or scanner noise) and the Nyquist limit
 * labelled inside the plot. Power in a.u.²/Hz on the y axis (label beside the ticks, not over them).
 */
export const SpectrumChart = memo(function SpectrumChart({
  frequencies,
  power,
  trSeconds,
  height = 150,
}: {
  frequencies: ArrayLike<number>;
  power: ArrayLike<number>;
  trSeconds: number;
  height?: number;
}) {
  const nyquist = 1 / (2 * trSeconds);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      legend: { show: false },
      cursor: { show: false },
      padding: [6, 18, 0, 0], // room on the right for the last frequency label
      scales: { x: { time: false, auto: false, range: [0, nyquist] }, y: { range: niceRange(4) } },
      axes: [niceAxis({ count: 6, size: 26 }), niceAxis({ count: 4, size: 40, label: 'power (a.u.²/Hz)' })],
      series: [{}, { stroke: CHART.trace, width: 1.25, points: { show: false } }],
      hooks: {
        draw: [
          (u) => {
            referenceLine(u, 0.1, '0.1 Hz', true, 'right');
            referenceLine(u, nyquist, `Nyquist ${nyquist.toFixed(3)} Hz`, false, 'left');
          },
        ],
      },
    }),
    [nyquist],
  );
  const data = useMemo<uPlot.AlignedData>(() => [frequencies as number[], power as number[]], [frequencies, power]);
  return (
    <div
      data-testid="spectrum-chart"
      aria-label={`Power spectrum (a.u.²/Hz) from 0 to the Nyquist limit ${nyquist.toFixed(3)} Hz`}
      role="img"
    >
      <UplotChart options={options} data={data} height={height} />
    </div>
  );
});
