import { DUSK_CSS, EMBER_CSS } from './colormaps';
import type { Sign } from '@/lib/desk/clusters';

const f1 = (v: number) => v.toFixed(1);

/**
 * The map's colour scale in numbers: transparent below the |z| threshold, the colours from the
 * threshold to the top of the scale (|z| above it takes the top colour), and the largest |z| of
 * the shown component ("—" until the map is read).
 */
export function ColourBar({
  threshold,
  top,
  maxAbsZ,
  sign,
  visible,
}: {
  threshold: number;
  top: number;
  maxAbsZ: number | null;
  sign: Sign;
  visible: boolean;
}) {
  const neg = sign !== 'positive';
  const pos = sign !== 'negative';
  return (
    <div
      className={`flex items-center gap-1.5 font-mono text-[11px] ${visible ? '' : 'opacity-40'}`}
      data-testid="colour-bar"
      data-sign={sign}
      data-visible={visible}
    >
      {neg ? (
        <>
          <span data-testid="colour-bar-neg-top">−{f1(top)}</span>
          <span className="h-2.5 w-14 rounded-sm" style={{ background: DUSK_CSS }} aria-hidden />
          <span>−{f1(threshold)}</span>
        </>
      ) : null}
      <span className="text-ink-muted" title="Voxels with |z| below the threshold are not coloured">
        |z| &lt; <span data-testid="colour-bar-threshold">{f1(threshold)}</span> clear
      </span>
      {pos ? (
        <>
          <span>+{f1(threshold)}</span>
          <span className="h-2.5 w-14 rounded-sm" style={{ background: EMBER_CSS }} aria-hidden />
          <span data-testid="colour-bar-top">+{f1(top)}</span>
        </>
      ) : null}
      <span className="ml-2 text-ink-muted">
        max |z|{' '}
        <span className="text-ink" data-testid="colour-bar-max">
          {maxAbsZ == null ? '—' : maxAbsZ.toFixed(2)}
        </span>
      </span>
      {!visible ? <span className="text-ink-muted">(map off · O)</span> : null}
    </div>
  );
}
