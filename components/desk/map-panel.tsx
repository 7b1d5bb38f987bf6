'use client';
import { memo, useCallback, useEffect, useState } from 'react';
import { VolumeViewer, type FrameInfo, type ViewerApi, type ViewerLocation } from '@/components/viewer';
import { ColourBar } from '@/components/viewer/colour-bar';
import { nextSign, type DeskPrefs } from '@/lib/desk/prefs';
import { useDeskMaps } from '@/lib/desk/use-desk-maps';

const SIGN_TEXT = { both: '± both', positive: '+ only', negative: '− only' } as const;

/**
 * The component's map as the desk and the read-only run view show it: the viewer, its colour bar
 * in numbers, the view controls (threshold, layout, large plane, map on/off, opacity, sign) and
 * the crosshair and cluster readouts. Keys reach the viewer through `api`.
 */
export const MapPanel = memo(function MapPanel({
  meanUrl,
  componentsUrl,
  mapsUrl = null,
  mapsVersion = 0,
  structuralUrl = null,
  frame,
  peakZ,
  prefs,
  setPrefs,
  api,
  onDrawn,
  onError,
}: {
  meanUrl: string;
  /** The maps as one 4D NIfTI file; or give `mapsUrl`. */
  componentsUrl?: string;
  /** The desk's map payload (e.g. /api/runs/5/maps): the shown map first, the rest in the background. */
  mapsUrl?: string | null;
  /** With `mapsUrl`: the decomposition id (a new decomposition is a new address). */
  mapsVersion?: number;
  /** The run's structural underlay, when a lead attached one: offered instead of the mean image. */
  structuralUrl?: string | null;
  frame: number;
  /** The component's peak |z| from its features (scales the colours), if known. */
  peakZ: number | null;
  prefs: DeskPrefs;
  setPrefs: React.Dispatch<React.SetStateAction<DeskPrefs>>;
  api: React.RefObject<ViewerApi | null>;
  onDrawn?: (frame: number, phase: 'issued' | 'painted') => void;
  onError?: (message: string) => void;
}) {
  const setApi = useCallback(
    (a: ViewerApi | null) => {
      api.current = a;
    },
    [api],
  );
  const [location, setLocation] = useState<ViewerLocation | null>(null);
  const [info, setInfo] = useState<FrameInfo | null>(null);
  const desk = useDeskMaps(mapsUrl, mapsVersion, frame);
  const waiting = Boolean(mapsUrl) && !desk.frameReady; // the shown component's map has not arrived yet
  useEffect(() => {
    if (desk.error) onError?.(desk.error);
  }, [desk.error, onError]);
  const top = Math.max(prefs.threshold + 2, Math.min(peakZ || 8, 15));
  const shownInfo = info?.frame === frame ? info : null;
  const overlay = prefs.overlay;
  const setOverlay = (o: Partial<DeskPrefs['overlay']>) => setPrefs((p) => ({ ...p, overlay: { ...p.overlay, ...o } }));
  return (
    <div className="flex min-w-0 flex-col gap-2">
      <div className="relative h-[26rem] overflow-hidden rounded border border-line bg-ground-sunken">
        <VolumeViewer
          meanUrl={meanUrl}
          componentsUrl={mapsUrl ? undefined : componentsUrl}
          maps={mapsUrl ? desk.maps : undefined}
          frameReady={mapsUrl ? desk.frameReady : undefined}
          underlayUrl={structuralUrl && prefs.underlay === 'structural' ? structuralUrl : meanUrl}
          frame={frame}
          threshold={prefs.threshold}
          maxZ={top}
          layout={prefs.layout}
          plane={prefs.plane}
          overlay={overlay}
          onApi={setApi}
          onLocation={setLocation}
          onFrameInfo={setInfo}
          onDrawn={onDrawn}
          onError={onError}
        />
        {waiting && desk.maps && !desk.error ? (
          <p
            className="pointer-events-none absolute left-2 top-2 rounded bg-ground/80 px-2 py-1 text-xs text-ink-muted"
            role="status"
            data-testid="map-loading"
            data-frame={frame}
          >
            Loading this component&apos;s map…
          </p>
        ) : null}
      </div>
      <div className="flex flex-wrap items-center gap-x-4 gap-y-1 text-xs text-ink-muted">
        <label className="flex items-center gap-2">
          |z| ≥
          <input
            type="range"
            min={1}
            max={12}
            step={0.1}
            value={prefs.threshold}
            onChange={(e) => setPrefs((p) => ({ ...p, threshold: Number(e.target.value) }))}
            aria-label="|z| threshold"
            data-testid="threshold"
            className="w-24 accent-lumen"
          />
          <span className="w-8 font-mono text-ink" data-testid="threshold-value">
            {prefs.threshold.toFixed(1)}
          </span>
        </label>
        <ColourBar
          threshold={prefs.threshold}
          top={top}
          maxAbsZ={shownInfo?.maxAbsZ ?? null}
          sign={overlay.sign}
          visible={overlay.visible}
        />
      </div>
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1 text-xs text-ink-muted">
        <div role="group" aria-label="Layout" className="flex overflow-hidden rounded border border-line-strong">
          {(['multiplanar', 'mosaic'] as const).map((l) => (
            <button
              key={l}
              type="button"
              aria-pressed={prefs.layout === l}
              onClick={() => setPrefs((p) => ({ ...p, layout: l }))}
              data-testid={`layout-${l}`}
              className={`px-2 py-0.5 ${prefs.layout === l ? 'bg-ground-raised text-ink' : 'text-ink-muted'}`}
            >
              {l === 'multiplanar' ? 'Three planes' : 'Mosaic'}
            </button>
          ))}
        </div>
        <label className="flex items-center gap-1">
          large plane (M)
          <select
            value={prefs.plane}
            onChange={(e) => setPrefs((p) => ({ ...p, plane: e.target.value as DeskPrefs['plane'] }))}
            className="rounded border border-line-strong bg-ground px-1 py-0.5 text-ink"
            data-testid="plane"
          >
            <option value="axial">axial</option>
            <option value="coronal">coronal</option>
            <option value="sagittal">sagittal</option>
          </select>
        </label>
        <button
          type="button"
          aria-pressed={overlay.visible}
          onClick={() => setOverlay({ visible: !overlay.visible })}
          className="rounded border border-line-strong px-2 py-0.5"
          data-testid="overlay-toggle"
        >
          map {overlay.visible ? 'on' : 'off'} (O)
        </button>
        <label className="flex items-center gap-1">
          opacity
          <input
            type="range"
            min={0.25}
            max={1}
            step={0.25}
            value={overlay.opacity}
            onChange={(e) => setOverlay({ opacity: Number(e.target.value) })}
            aria-label="Map opacity"
            data-testid="overlay-opacity"
            className="w-16 accent-lumen"
          />
          <span className="w-8 font-mono text-ink" data-testid="overlay-opacity-value">
            {Math.round(overlay.opacity * 100)}%
          </span>
        </label>
        <button
          type="button"
          onClick={() => setOverlay({ sign: nextSign(overlay.sign) })}
          className="rounded border border-line-strong px-2 py-0.5"
          data-testid="overlay-sign"
        >
          {SIGN_TEXT[overlay.sign]} (V)
        </button>
        {structuralUrl ? (
          <div className="flex items-center gap-1">
            underlay (B)
            <div role="group" aria-label="Underlay" className="flex overflow-hidden rounded border border-line-strong">
              {(['mean', 'structural'] as const).map((u) => (
                <button
                  key={u}
                  type="button"
                  aria-pressed={prefs.underlay === u}
                  onClick={() => setPrefs((p) => ({ ...p, underlay: u }))}
                  data-testid={`underlay-${u}`}
                  className={`px-2 py-0.5 ${prefs.underlay === u ? 'bg-ground-raised text-ink' : 'text-ink-muted'}`}
                >
                  {u === 'mean' ? 'mean image' : 'structural'}
                </button>
              ))}
            </div>
          </div>
        ) : null}
        <button
          type="button"
          onClick={() => api.current?.nextCluster()}
          className="rounded border border-line-strong px-2 py-0.5"
          data-testid="next-peak"
        >
          next peak (P)
        </button>
        <span
          className="font-mono"
          data-testid="cluster-readout"
          data-cluster={shownInfo?.cluster ?? ''}
          data-clusters={shownInfo?.clusters ?? ''}
        >
          {!shownInfo
            ? ''
            : shownInfo.clusters === 0
              ? `no cluster at |z| ≥ ${prefs.threshold.toFixed(1)}`
              : shownInfo.cluster
                ? `peak ${shownInfo.cluster} of ${shownInfo.clusters} · z ${shownInfo.peakZ?.toFixed(2) ?? '—'}`
                : `${shownInfo.clusters} clusters`}
        </span>
        <span className="ml-auto font-mono" data-testid="crosshair-readout">
          {location
            ? `${location.mm.map((v) => v.toFixed(0)).join(', ')} mm · z ${location.z == null || waiting ? '—' : location.z.toFixed(2)}`
            : 'click the map to read z'}
        </span>
      </div>
    </div>
  );
});
