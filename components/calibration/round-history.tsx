import type { CalibrationRoundEntry } from '@/lib/db/queries/calibration-rounds';

const f2 = (v: number | null) => (v == null ? '—' : v.toFixed(2));

/**
 * A rater's calibration rounds over time: a small plot (AC1 and noise sensitivity per round, 0–1,
 * with the study's threshold lines) and a table. An undefined value is not drawn and reads "—".
 */
export function RoundHistory({
  rounds,
  minAc1,
  minSensitivity,
  raterId,
}: {
  rounds: CalibrationRoundEntry[];
  minAc1: number | null;
  minSensitivity: number | null;
  raterId: number;
}) {
  if (!rounds.length) return null;
  const W = 260,
    H = 120,
    P = 24;
  const n = rounds.length;
  const x = (i: number) => (n === 1 ? W / 2 : P + (i * (W - 2 * P)) / (n - 1));
  const y = (v: number) => H - P + 4 - v * (H - P - 8);
  const series = (key: 'ac1' | 'sensitivity') => rounds.map((r, i) => (r[key] == null ? null : ([x(i), y(r[key]!)] as const)));
  const line = (pts: ReturnType<typeof series>) =>
    pts
      .filter((p) => p)
      .map((p) => `${p![0]},${p![1]}`)
      .join(' ');
  const ac1 = series('ac1'),
    sens = series('sensitivity');
  return (
    <div className="mt-2 flex flex-wrap items-start gap-4" data-testid={`calibration-rounds-${raterId}`}>
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="h-28 w-64"
        role="img"
        aria-label="AC1 and noise sensitivity per calibration round, with the threshold"
        data-testid="calibration-rounds-plot"
      >
        <rect x={P} y={y(1)} width={W - 2 * P} height={y(0) - y(1)} className="fill-none stroke-line" />
        {[0, 0.5, 1].map((t) => (
          <text key={t} x={P - 4} y={y(t) + 3} textAnchor="end" className="fill-ink-faint text-[9px]">
            {t}
          </text>
        ))}
        {minAc1 != null ? (
          <line
            x1={P}
            x2={W - P}
            y1={y(minAc1)}
            y2={y(minAc1)}
            className="stroke-lumen"
            strokeDasharray="4 3"
            data-testid="rounds-threshold-ac1"
          >
            <title>{`AC1 threshold ${minAc1.toFixed(2)}`}</title>
          </line>
        ) : null}
        {minSensitivity != null ? (
          <line
            x1={P}
            x2={W - P}
            y1={y(minSensitivity)}
            y2={y(minSensitivity)}
            className="stroke-alarm"
            strokeDasharray="2 3"
            data-testid="rounds-threshold-sensitivity"
          >
            <title>{`noise sensitivity threshold ${minSensitivity.toFixed(2)}`}</title>
          </line>
        ) : null}
        <polyline points={line(ac1)} className="fill-none stroke-lumen" />
        <polyline points={line(sens)} className="fill-none stroke-alarm" />
        {ac1.map((p, i) =>
          p ? (
            <circle key={`a${i}`} cx={p[0]} cy={p[1]} r={3} className="fill-lumen" data-testid="rounds-point-ac1">
              <title>{`round ${rounds[i]!.round}: AC1 ${f2(rounds[i]!.ac1)}`}</title>
            </circle>
          ) : null,
        )}
        {sens.map((p, i) =>
          p ? (
            <rect
              key={`s${i}`}
              x={p[0] - 2.5}
              y={p[1] - 2.5}
              width={5}
              height={5}
              className="fill-alarm"
              data-testid="rounds-point-sensitivity"
            >
              <title>{`round ${rounds[i]!.round}: noise sensitivity ${f2(rounds[i]!.sensitivity)}`}</title>
            </rect>
          ) : null,
        )}
        {rounds.map((r, i) => (
          <text key={r.round} x={x(i)} y={H - 4} textAnchor="middle" className="fill-ink-faint text-[9px]">
            {r.round}
          </text>
        ))}
      </svg>
      <table className="text-xs" data-testid="calibration-rounds-table">
        <thead className="text-left text-ink-faint">
          <tr>
            <th className="pr-2 font-medium">Round</th>
            <th className="pr-2 font-medium">Submitted</th>
            <th className="pr-2 text-right font-medium">Components</th>
            <th className="pr-2 text-right font-medium">AC1</th>
            <th className="pr-2 text-right font-medium">Noise sens.</th>
          </tr>
        </thead>
        <tbody>
          {rounds.map((r) => (
            <tr key={r.round} data-testid="calibration-round">
              <td className="pr-2 tabular-nums">
                {r.round}
                {r.closed ? '' : ' (current)'}
              </td>
              <td className="pr-2 tabular-nums">{r.submittedAt.slice(0, 10)}</td>
              <td className="pr-2 text-right tabular-nums">{r.components}</td>
              <td className="pr-2 text-right tabular-nums">{f2(r.ac1)}</td>
              <td className="pr-2 text-right tabular-nums">{f2(r.sensitivity)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="w-full text-[11px] text-ink-faint">
        Line: AC1 (circles) and noise sensitivity (squares) per round; dashed: the study&apos;s threshold.
      </p>
    </div>
  );
}
