'use client';
import { useEffect, useLayoutEffect, useRef, useState } from 'react';
import { Niivue, SHOW_RENDER, type NiiVueLocation } from '@niivue/niivue';
import { DUSK, EMBER } from './colormaps';

export type ViewerLayout = 'multiplanar' | 'mosaic';
export type ViewerLocation = { mm: [number, number, number]; vox: [number, number, number]; z: number | null };

export type VolumeViewerProps = {
  /** Address of the run's mean image and its 4D component maps (one request each, once). */
  meanUrl: string;
  componentsUrl: string;
  /** 0-based component frame to show. */
  frame: number;
  /** |z| below this is transparent. */
  threshold: number;
  /** Top of the colour scale (|z|). */
  maxZ: number;
  layout: ViewerLayout;
  onLocation?: (loc: ViewerLocation) => void;
  /** Called when the frame's draw calls are issued, and again once the browser painted it (timing marks). */
  onDrawn?: (frame: number, phase: 'issued' | 'painted') => void;
  onError?: (message: string) => void;
};

/** After the browser has painted the next frame. */
function afterPaint(fn: () => void) {
  requestAnimationFrame(() => {
    const ch = new MessageChannel();
    ch.port1.onmessage = () => fn();
    ch.port2.postMessage(null);
  });
}

function mosaicString(min: number[], max: number[]): string {
  const n = 12;
  const zs = Array.from({ length: n }, (_, i) => min[2] + ((i + 1) * (max[2] - min[2])) / (n + 1));
  const row = (part: number[]) => `A ${part.map((z) => z.toFixed(1)).join(' ')}`;
  return `${row(zs.slice(0, 6))} ; ${row(zs.slice(6))}`;
}

/**
 * The desk's volume viewer (WebGL2): the run's mean image in grey with the current component's
 * z-map over it (positive "ember", negative "dusk"), multiplanar or mosaic. Both images are loaded
 * once; switching components only changes the displayed frame of the 4D map.
 */
export default function VolumeViewer(props: VolumeViewerProps) {
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const nvRef = useRef<Niivue | null>(null);
  const [ready, setReady] = useState(false);
  const latest = useRef(props);
  useLayoutEffect(() => {
    latest.current = props;
  });

  useEffect(() => {
    const canvas = canvasRef.current;
    if (!canvas) return;
    let cancelled = false;
    const nv = new Niivue({
      backColor: [0.039, 0.047, 0.063, 1],
      crosshairColor: [0.31, 0.72, 0.69, 0.75],
      crosshairWidth: 1,
      crosshairWidthUnit: 'mm', // a thin line whatever the voxel size
      show3Dcrosshair: false,
      isColorbar: false,
      multiplanarShowRender: SHOW_RENDER.NEVER,
      dragAndDropEnabled: false,
      textHeight: 0.035,
      isOrientationTextVisible: true,
      loadingText: 'loading maps…',
    });
    nvRef.current = nv;
    if (window.__quorumTestHooks) (window as unknown as { __quorumViewer?: Niivue }).__quorumViewer = nv; // for the browser tests' timing breakdown
    (async () => {
      await nv.attachToCanvas(canvas);
      nv.addColormap('quorum-ember', EMBER);
      nv.addColormap('quorum-dusk', DUSK);
      const p = latest.current;
      await nv.loadVolumes([
        { url: p.meanUrl, name: 'mean.nii.gz', colormap: 'gray' },
        {
          url: p.componentsUrl,
          name: 'components.nii.gz',
          colormap: 'quorum-ember',
          colormapNegative: 'quorum-dusk',
          cal_min: p.threshold,
          cal_max: p.maxZ,
          frame4D: p.frame,
        },
      ]);
      if (cancelled) return;
      nv.onLocationChange = (raw: unknown) => {
        const loc = raw as NiiVueLocation;
        const value = loc.values?.[1]?.value;
        latest.current.onLocation?.({
          mm: [loc.mm[0], loc.mm[1], loc.mm[2]],
          vox: [loc.vox[0], loc.vox[1], loc.vox[2]],
          z: typeof value === 'number' && Number.isFinite(value) ? value : null,
        });
      };
      setReady(true);
    })().catch((err: Error) => {
      if (!cancelled) latest.current.onError?.(`The maps could not be loaded: ${err.message}`);
    });
    return () => {
      cancelled = true;
      nvRef.current = null;
      try {
        const gl = nv.gl as WebGL2RenderingContext | null;
        gl?.getExtension('WEBGL_lose_context')?.loseContext();
      } catch {
        /* already gone */
      }
    };
  }, [props.meanUrl, props.componentsUrl]);

  // layout
  useEffect(() => {
    const nv = nvRef.current;
    if (!nv || !ready) return;
    if (props.layout === 'mosaic') {
      const v = nv.volumes[0];
      nv.setSliceMosaicString(mosaicString(v.extentsMinOrtho ?? [0, 0, -50], v.extentsMaxOrtho ?? [0, 0, 50]));
    } else {
      nv.setSliceMosaicString('');
      nv.setSliceType(nv.sliceTypeMultiplanar);
    }
    nv.drawScene();
  }, [props.layout, ready]);

  // threshold and scale
  useEffect(() => {
    const nv = nvRef.current;
    if (!nv || !ready || nv.volumes.length < 2) return;
    const v = nv.volumes[1];
    v.cal_min = props.threshold;
    v.cal_max = Math.max(props.maxZ, props.threshold + 0.5);
    nv.updateGLVolume();
  }, [props.threshold, props.maxZ, ready]);

  // component frame: the only thing that changes between components
  useEffect(() => {
    const nv = nvRef.current;
    if (!nv || !ready || nv.volumes.length < 2) return;
    nv.setFrame4D(nv.volumes[1].id, props.frame); // re-blends the layers and draws the scene
    const frame = props.frame;
    latest.current.onDrawn?.(frame, 'issued');
    afterPaint(() => latest.current.onDrawn?.(frame, 'painted'));
  }, [props.frame, ready]);

  return (
    <div className="relative h-full w-full">
      <canvas ref={canvasRef} data-testid="viewer-canvas" className="block h-full w-full" aria-label="Component map over the mean image" role="img" />
      {!ready ? (
        <p className="absolute inset-0 flex items-center justify-center text-sm text-ink-muted" data-testid="viewer-loading">
          Loading the run&apos;s maps…
        </p>
      ) : (
        <span hidden data-testid="viewer-ready" />
      )}
    </div>
  );
}
