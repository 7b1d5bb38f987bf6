import type { CalibrationBin } from '@/lib/suggestions/cross-validate';

/**
 * Reliability diagram: mean predicted P(noise) (x) against the observed fraction of noise (y) per
 * bin of out-of-fold predictions; the diagonal is perfect calibration. Empty bins are not drawn.
 */
export function CalibrationPlot({ bins }: { bins: CalibrationBin[] }) {
  const W = 220,
    H = 220,
    P = 28;
  const x = (v: number) => P + v * (W - 2 * P);
  const y = (v: number) => H - P - v * (H - 2 * P);
  const pts = bins.filter((b) => b.n > 0 && b.meanPredicted !== null && b.observedNoise !== null);
  const max = Math.max(1, ...pts.map((b) => b.n));
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      className="h-56 w-56"
      role="img"
      aria-label="Calibration plot: predicted against observed noise fraction"
      data-testid="suggestion-calibration-plot"
    >
      <rect x={x(0)} y={y(1)} width={x(1) - x(0)} height={y(0) - y(1)} className="fill-none stroke-line" />
      <line x1={x(0)} y1={y(0)} x2={x(1)} y2={y(1)} className="stroke-line-strong" strokeDasharray="4 3" />
      {[0, 0.5, 1].map((t) => (
        <g key={t} className="fill-ink-faint text-[9px]">
          <text x={x(t)} y={H - P + 12} textAnchor="middle">
            {t}
          </text>
          <text x={P - 6} y={y(t) + 3} textAnchor="end">
            {t}
          </text>
        </g>
      ))}
      <text x={W / 2} y={H - 2} textAnchor="middle" className="fill-ink-muted text-[9px]">
        predicted P(noise)
      </text>
      <text x={8} y={H / 2} textAnchor="middle" transform={`rotate(-90 8 ${H / 2})`} className="fill-ink-muted text-[9px]">
        observed noise fraction
      </text>
      <polyline points={pts.map((b) => `${x(b.meanPredicted!)},${y(b.observedNoise!)}`).join(' ')} className="fill-none stroke-lumen" />
      {pts.map((b) => (
        <circle key={b.from} cx={x(b.meanPredicted!)} cy={y(b.observedNoise!)} r={2 + 4 * Math.sqrt(b.n / max)} className="fill-lumen">
          <title>{`${b.from.toFixed(1)}–${b.to.toFixed(1)}: ${b.n} components, observed ${b.observedNoise!.toFixed(2)}`}</title>
        </circle>
      ))}
    </svg>
  );
}
