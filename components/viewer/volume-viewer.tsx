'use client';
import { useEffect, useLayoutEffect, useRef, useState } from 'react';
import { DRAG_MODE, NVImage, Niivue, SHOW_RENDER, SLICE_TYPE, type NiiVueLocation } from '@niivue/niivue';
import { DUSK, EMBER, NONE } from './colormaps';
import { blendMapsOnCpu } from './cpu-blend';
import { withoutPasses } from './gl-gate';
import { deferProgramsOn } from './lazy-programs';
import { skipGradientPass } from './skip-gradient-pass';
import { findClusters, maxAbs, type Cluster, type Sign } from '@/lib/desk/clusters';
import { mosaicSpec, planMosaic } from '@/lib/desk/mosaic';
import type { MapFrames } from '@/lib/desk/use-desk-maps';

export type ViewerLayout = 'multiplanar' | 'mosaic';
export type ViewerPlane = 'axial' | 'coronal' | 'sagittal';
export type ViewerLocation = { mm: [number, number, number]; vox: [number, number, number]; z: number | null };
export type OverlaySettings = { visible: boolean; opacity: number; sign: Sign };
/** What the viewer found in the shown component: its clusters above the threshold and which one the crosshair is on. */
export type FrameInfo = {
  frame: number;
  maxAbsZ: number | null;
  clusters: number;
  cluster: number | null;
  peakZ: number | null;
  peakMm: [number, number, number] | null;
};

/** Commands the desk sends to the viewer (keys). */
export type ViewerApi = {
  nextCluster: () => void;
  moveSlice: (delta: number) => void;
  zoom: (factor: number) => void;
  pan: (dx: number, dy: number) => void;
  resetView: () => void;
};

export type VolumeViewerProps = {
  /** Address of the run's mean image and its 4D component maps (one request each, once). */
  meanUrl: string;
  /** Another image on the same grid to show under the map instead of the mean image (a structural image); swapped in place. */
  underlayUrl?: string | null;
  /** The 4D component maps as one NIfTI file (Reconcile, calibration); or give `maps`. */
  componentsUrl?: string;
  /** The maps as the desk loads them, component by component (lib/desk/use-desk-maps.ts); the viewer waits for it. */
  maps?: MapFrames | null;
  /** With `maps`: whether the shown frame's map has arrived (until then no map is drawn and no readouts are given). */
  frameReady?: boolean;
  /** 0-based component frame to show. */
  frame: number;
  /** |z| below this is transparent. */
  threshold: number;
  /** Top of the colour scale (|z|). */
  maxZ: number;
  layout: ViewerLayout;
  /** The large plane of the three-plane layout; slice keys move through it. */
  plane?: ViewerPlane;
  overlay?: OverlaySettings;
  /** Move the crosshair to the largest cluster's peak on each new component (default true). */
  followPeak?: boolean;
  /** Receives the viewer's commands for the desk's keys (null when the viewer goes). */
  onApi?: (api: ViewerApi | null) => void;
  onLocation?: (loc: ViewerLocation) => void;
  onFrameInfo?: (info: FrameInfo) => void;
  /** Called when the frame's draw calls are issued, and again once the browser painted it (timing marks). */
  onDrawn?: (frame: number, phase: 'issued' | 'painted') => void;
  onError?: (message: string) => void;
};

const PLANE_TYPE: Record<ViewerPlane, SLICE_TYPE> = { axial: SLICE_TYPE.AXIAL, coronal: SLICE_TYPE.CORONAL, sagittal: SLICE_TYPE.SAGITTAL };
const DEFAULT_OVERLAY: OverlaySettings = { visible: true, opacity: 1, sign: 'both' };

/** After the browser has painted the next frame. */
function afterPaint(fn: () => void) {
  requestAnimationFrame(() => {
    const ch = new MessageChannel();
    ch.port1.onmessage = () => fn();
    ch.port2.postMessage(null);
  });
}

type Vol = Niivue['volumes'][number];

/** With a `maps` source: which component's map the one-frame map volume holds (-1: none, all zero). */
const heldFrame = new WeakMap<Niivue, number>();

/**
 * With a `maps` source: writes the frame's map into the one-frame map volume when it has arrived;
 * false while it has not (the volume is then all zero: no map is drawn, never another one's).
 */
function ensureFrame(nv: Niivue, frame: number, latest: LatestRef): boolean {
  const maps = latest.current.maps;
  if (!maps) return true;
  if (heldFrame.get(nv) === frame) return true;
  const data = maps.frame(frame);
  const img = nv.volumes[1].img as Float32Array;
  if (data) img.set(data);
  else if (heldFrame.get(nv) !== -1) img.fill(0);
  heldFrame.set(nv, data ? frame : -1);
  return Boolean(data);
}

/**
 * Blends the map layer again (another frame, threshold, scale, sign or opacity) and draws once.
 * Only the map layer: Niivue's own setFrame4D / updateGLVolume / setOpacity refresh every layer,
 * and the underlay's layer (with the gradients for 3D rendering, which the desk never shows) cost
 * most of a switch in software WebGL. The desk's maps are blended on the CPU into the texture
 * Niivue already made (cpu-blend.ts, the same colours); anything else goes through Niivue's GPU
 * blend, which allocates a new map texture without freeing the old one, so it is freed here.
 */
function blendMaps(nv: Niivue) {
  if (!blendMapsOnCpu(nv)) {
    const old = nv.overlayTexture;
    nv.refreshLayers(nv.volumes[1], 1);
    if (old && old !== nv.overlayTexture) nv.gl.deleteTexture(old);
  }
  nv.drawScene();
}

/**
 * Puts the viewer's layers in place (underlay first) with one upload and blend of each layer. Niivue's
 * addVolume / removeVolume re-blend every layer on each call, and the underlay's blend carries its
 * gradient pass for 3D rendering, which the desk never shows (≈ 0.3–0.6 s each in software WebGL).
 */
function setLayers(nv: Niivue, volumes: Vol[], { draw }: { draw: boolean }) {
  nv.volumes = volumes;
  if (draw) {
    nv.setVolume(volumes[0], 0); // sets the underlay and overlays, then one updateGLVolume (which draws)
    return;
  }
  // the caller blends the map and draws once, after the map is in: at load, one frame to wait for
  // instead of two; the map layer's GPU blend here would be overwritten by that blend (the texture it
  // allocates is kept), so its passes are dropped
  const drawScene = nv.drawScene;
  const refreshLayers = nv.refreshLayers;
  const gl = nv.gl as WebGL2RenderingContext;
  nv.drawScene = () => undefined;
  nv.refreshLayers = (vol: Vol, layer: number) =>
    layer === 1 ? withoutPasses(gl, () => refreshLayers.call(nv, vol, layer)) : refreshLayers.call(nv, vol, layer);
  try {
    nv.setVolume(volumes[0], 0);
  } finally {
    nv.drawScene = drawScene;
    nv.refreshLayers = refreshLayers;
  }
}

/** One frame of a 4D image as a voxel reader in native order (scaled to z). */
function frameReader(vol: Vol, frame: number) {
  const hdr = vol.hdr!;
  const [nx, ny, nz] = [hdr.dims[1], hdr.dims[2], hdr.dims[3]];
  const img = vol.img as ArrayLike<number>;
  const slope = hdr.scl_slope || 1;
  const inter = hdr.scl_inter || 0;
  const off = img.length > nx * ny * nz ? frame * nx * ny * nz : 0; // the 4D file, or the desk's one-frame volume
  return { dims: [nx, ny, nz] as [number, number, number], at: (i: number) => img[off + i] * slope + inter };
}

/** Native voxel → mm through the image's own affine (NIfTI sform/qform rows). */
function voxToMm(vol: Vol, v: [number, number, number]): [number, number, number] {
  const a = vol.hdr!.affine;
  return [0, 1, 2].map((r) => a[r][0] * v[0] + a[r][1] * v[1] + a[r][2] * v[2] + a[r][3]) as [number, number, number];
}

type ClustersRef = React.RefObject<{ frame: number; list: Cluster[]; at: number; maxAbsZ: number | null }>;
type LatestRef = React.RefObject<VolumeViewerProps>;

/** Clusters of the shown frame at the current threshold and sign (cached per frame). */
function clustersOf(nv: Niivue, frame: number, clustersRef: ClustersRef, latest: LatestRef) {
  const c = clustersRef.current;
  if (c.frame === frame) return c;
  if (!ensureFrame(nv, frame, latest)) return { frame: -1, list: [], at: -1, maxAbsZ: null };
  const vol = nv.volumes[1];
  const { dims, at } = frameReader(vol, frame);
  const p = latest.current;
  const list = findClusters(at, dims, p.threshold, { sign: p.overlay?.sign ?? 'both', limit: 50 });
  const maxAbsZ = maxAbs(at, dims[0] * dims[1] * dims[2]);
  clustersRef.current = { frame, list, at: -1, maxAbsZ };
  p.onFrameInfo?.({ frame, maxAbsZ, clusters: list.length, cluster: null, peakZ: null, peakMm: null });
  return clustersRef.current;
}

/** Crosshair to cluster `i` (the planes follow); keeps the point where it was on screen when zoomed. */
function goToCluster(nv: Niivue, frame: number, i: number, draw: boolean, clustersRef: ClustersRef, latest: LatestRef) {
  const c = clustersOf(nv, frame, clustersRef, latest);
  if (!c.list.length) return;
  const k = ((i % c.list.length) + c.list.length) % c.list.length;
  c.at = k;
  const cl = c.list[k];
  const mm = voxToMm(nv.volumes[1], cl.peak);
  nv.scene.crosshairPos = nv.mm2frac(mm);
  const zoom = nv.scene.pan2Dxyzmm[3];
  if (zoom > 1) nv.scene.pan2Dxyzmm = [(1 - zoom) * mm[0], (1 - zoom) * mm[1], (1 - zoom) * mm[2], zoom];
  latest.current.onFrameInfo?.({
    frame,
    maxAbsZ: c.maxAbsZ,
    clusters: c.list.length,
    cluster: k + 1,
    peakZ: cl.peakZ,
    peakMm: mm,
  });
  if (!draw) return; // the caller draws (and reports the location) once, after the new frame is blended
  nv.createOnLocationChange();
  nv.drawScene();
}

const sourceIds = new WeakMap<object, number>();
let nextSourceId = 1;

/** Names what the viewer shows (the underlay and the maps): a new source is a new viewer on a new canvas. */
function sourceKey(p: VolumeViewerProps): string {
  let id = 0;
  if (p.maps) {
    id = sourceIds.get(p.maps) ?? nextSourceId++;
    sourceIds.set(p.maps, id);
  }
  return `${p.meanUrl}|${p.componentsUrl ?? ''}|${id}`;
}

type MapShown = { frame: number; key: string; clusterKey: string };

/**
 * Sets the layout's fields (three planes with one large, or a mosaic that fills the canvas) without
 * drawing; true when they changed. Niivue's setSliceMosaicString re-blends every layer (with the
 * underlay's gradient pass) and setSliceType draws, neither needed for a change of layout.
 */
function applyLayout(nv: Niivue, canvas: HTMLCanvasElement, p: VolumeViewerProps, shownRef: React.RefObject<string | null>): boolean {
  const plane = p.plane ?? 'axial';
  let key: string;
  if (p.layout === 'mosaic') {
    const v = nv.volumes[0];
    const min = v.extentsMinOrtho ?? [-90, -110, -60];
    const max = v.extentsMaxOrtho ?? [90, 90, 80];
    const plan = planMosaic({
      viewW: canvas.clientWidth,
      viewH: canvas.clientHeight,
      sliceW: max[0] - min[0],
      sliceH: max[1] - min[1],
      zMin: min[2],
      zMax: max[2],
    });
    key = `mosaic|${mosaicSpec(plan)}`;
    if (key === shownRef.current) return false;
    nv.sliceMosaicString = mosaicSpec(plan);
  } else {
    key = `planes|${plane}`;
    if (key === shownRef.current) return false;
    nv.sliceMosaicString = '';
    nv.opts.heroImageFraction = 0.55;
    nv.opts.heroSliceType = PLANE_TYPE[plane];
    nv.opts.sliceType = nv.sliceTypeMultiplanar;
  }
  shownRef.current = key;
  canvas.setAttribute('data-layout', key); // for people's tools and the browser tests, like data-zoom
  return true;
}

/**
 * Puts the map layer in the state the props ask for (the component's frame, the threshold and
 * scale, sign and opacity) and draws once, if anything changed. A switch usually changes the frame
 * and the scale (it follows the component's peak) together: one blend, one draw, one paint.
 */
function showMap(
  nv: Niivue,
  latest: LatestRef,
  shownRef: React.RefObject<MapShown | null>,
  clustersRef: ClustersRef,
  firstPainted: React.RefObject<boolean>,
) {
  const p = latest.current;
  const overlay = p.overlay ?? DEFAULT_OVERLAY;
  const maxZ = Math.max(p.maxZ, p.threshold + 0.5);
  const frame = p.frame;
  const v = nv.volumes[1];
  const clusterKey = `${p.threshold}|${overlay.sign}`;
  const key = `${clusterKey}|${maxZ}|${overlay.visible}|${overlay.opacity}`;
  const before = shownRef.current;
  if (before?.key !== key) {
    v.cal_min = p.threshold;
    v.cal_max = maxZ;
    v.colormap = overlay.sign === 'negative' ? 'quorum-none' : 'quorum-ember';
    v.colormapNegative = overlay.sign === 'positive' ? '' : 'quorum-dusk';
    v.opacity = overlay.visible ? overlay.opacity : 0;
  }
  // clusters depend on the threshold and sign (not on the scale's top)
  if (before && before.clusterKey !== clusterKey) clustersRef.current.frame = -1;
  // with the desk's maps, the held map (-1 until the shown component's map has arrived: no map, no readouts)
  const held = ensureFrame(nv, frame, latest) ? frame : -1;
  const frameChanged = before?.frame !== held;
  shownRef.current = { frame: held, key, clusterKey };
  if (!frameChanged && before?.key === key) return; // as shown
  nv.canvas?.setAttribute('data-map', held === -1 ? 'none' : String(held)); // the 0-based component whose map is drawn
  if (held === -1 || !frameChanged) {
    if (held !== -1) clustersOf(nv, frame, clustersRef, latest);
    blendMaps(nv);
    return;
  }
  v.frame4D = (v.nFrame4D ?? 1) > 1 ? frame : 0; // the desk's map volume holds one frame
  if (p.followPeak ?? true) goToCluster(nv, frame, 0, false, clustersRef, latest);
  else clustersOf(nv, frame, clustersRef, latest);
  blendMaps(nv);
  nv.createOnLocationChange();
  p.onDrawn?.(frame, 'issued');
  afterPaint(() => {
    if (!firstPainted.current) {
      // one User Timing mark per page: navigation start → the first map on screen (read by `npm run bench -- desk`)
      firstPainted.current = true;
      performance.clearMarks('viewer:painted');
      performance.mark('viewer:painted');
    }
    latest.current.onDrawn?.(frame, 'painted');
  });
}

/**
 * The desk's volume viewer (WebGL2): the run's mean image in grey with the current component's
 * z-map over it (positive "ember", negative "dusk"), three planes (one large) or a mosaic. Both
 * images are loaded once; switching components changes the displayed frame of the 4D map and moves
 * the crosshair to the component's largest cluster.
 */
export default function VolumeViewer(props: VolumeViewerProps) {
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const nvRef = useRef<Niivue | null>(null);
  // the viewer whose layers are in place: a new source makes a new viewer, and the effects below run
  // again once it is ready (on its own canvas: a canvas whose WebGL context was released gets no other)
  const [readyNv, setReadyNv] = useState<Niivue | null>(null);
  const ready = readyNv !== null;
  const underlayShown = useRef<string | null>(null);
  const [underlayReady, setUnderlayReady] = useState<string | null>(null);
  const latest = useRef(props);
  const clustersRef = useRef<{ frame: number; list: Cluster[]; at: number; maxAbsZ: number | null }>({
    frame: -1,
    list: [],
    at: -1,
    maxAbsZ: null,
  });
  const layoutShown = useRef<string | null>(null);
  const mapShown = useRef<MapShown | null>(null);
  const firstPainted = useRef(false);
  useLayoutEffect(() => {
    latest.current = props;
  });

  useEffect(() => {
    const canvas = canvasRef.current;
    if (!canvas || (!props.componentsUrl && !props.maps)) return; // the desk's maps are on their way
    let cancelled = false;
    // a new viewer: nothing of the previous one's layout, map or clusters is on it
    clustersRef.current.frame = -1;
    layoutShown.current = null;
    mapShown.current = null;
    canvas.removeAttribute('data-layout');
    canvas.removeAttribute('data-map');
    const nv = new Niivue({
      backColor: [0.039, 0.047, 0.063, 1],
      crosshairColor: [0.31, 0.72, 0.69, 0.75],
      crosshairWidth: 1,
      crosshairWidthUnit: 'mm', // a thin line whatever the voxel size
      show3Dcrosshair: false,
      isColorbar: false,
      multiplanarShowRender: SHOW_RENDER.NEVER,
      dragAndDropEnabled: false,
      dragMode: DRAG_MODE.pan, // right-drag pans, as the keys do
      centerMosaic: true,
      textHeight: 0.035,
      isOrientationTextVisible: true,
      loadingText: '', // the component's own "Loading the run's maps…" says it once
    });
    nvRef.current = nv;
    // no meshes here: the library's lighting image for them is neither decoded nor uploaded
    (nv as unknown as { loadDefaultMatCap: () => Promise<void> }).loadDefaultMatCap = async () => undefined;
    // the desk's underlay is fetched while the canvas is set up
    const start = latest.current;
    const underFirst = start.maps
      ? NVImage.loadFromUrl({ url: start.underlayUrl || start.meanUrl, name: 'underlay.nii.gz', colormap: 'gray' })
      : null;
    underFirst?.catch(() => undefined); // reported below, once awaited
    deferProgramsOn(canvas); // the library's ≈ 37 programs: each compiled when first drawn with
    (async () => {
      await nv.attachToCanvas(canvas);
      skipGradientPass(nv); // no 3D rendering here: the underlay's gradient pass is not needed
      nv.addColormap('quorum-ember', EMBER);
      nv.addColormap('quorum-dusk', DUSK);
      nv.addColormap('quorum-none', NONE);
      const p = latest.current;
      const under = p.underlayUrl || p.meanUrl; // the same as underFirst's
      underlayShown.current = under;
      const look = { colormap: 'quorum-ember', colormapNegative: 'quorum-dusk', cal_min: p.threshold, cal_max: p.maxZ, frame4D: p.frame };
      if (p.maps) {
        // the desk's maps: a one-frame volume made here, holding the shown map (ensureFrame)
        const [underImg, img] = await Promise.all([
          underFirst!,
          NVImage.loadFromUrl({ url: 'components.nii', name: 'components.nii', buffer: p.maps.emptyVolume(), ...look, frame4D: 0 }),
        ]);
        if (cancelled) return;
        setLayers(nv, [underImg, img], { draw: false }); // drawn below with the map, in the same frame
      } else {
        await nv.loadVolumes([
          { url: under, name: 'underlay.nii.gz', colormap: 'gray' },
          { url: p.componentsUrl ?? '', name: 'components.nii.gz', ...look },
        ]);
      }
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
      // the layout and the shown map now, drawn once: the first frame the browser paints is the
      // finished picture (the effects below then find nothing to change)
      applyLayout(nv, canvas, latest.current, layoutShown);
      showMap(nv, latest, mapShown, clustersRef, firstPainted);
      setReadyNv(nv);
      setUnderlayReady(under);
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
  }, [props.meanUrl, props.componentsUrl, props.maps]);

  // underlay: the mean image or a structural image on the same grid, swapped without reloading the maps
  const underlayUrl = props.underlayUrl || props.meanUrl;
  useEffect(() => {
    const nv = nvRef.current;
    if (!nv || !readyNv || nv.volumes.length < 2) return;
    if (underlayShown.current === underlayUrl) return;
    let cancelled = false;
    (async () => {
      const img = await NVImage.loadFromUrl({ url: underlayUrl, name: 'underlay.nii.gz', colormap: 'gray' });
      if (cancelled || nvRef.current !== nv) return;
      setLayers(nv, [img, ...nv.volumes.slice(1)], { draw: true });
      underlayShown.current = underlayUrl;
      setUnderlayReady(underlayUrl);
    })().catch((err: Error) => {
      if (!cancelled) latest.current.onError?.(`The underlay could not be loaded: ${err.message}`);
    });
    return () => {
      cancelled = true;
    };
  }, [underlayUrl, readyNv]);

  // layout: three planes with one large, or a mosaic that fills the viewer
  useEffect(() => {
    const nv = nvRef.current;
    const canvas = canvasRef.current;
    if (!nv || !readyNv || !canvas || nv.volumes.length === 0) return; // a new viewer sets its layout when its layers are in
    const apply = () => {
      if (applyLayout(nv, canvas, latest.current, layoutShown)) nv.drawScene();
    };
    apply();
    if (props.layout !== 'mosaic') return;
    const ro = new ResizeObserver(() => apply());
    ro.observe(canvas);
    return () => ro.disconnect();
  }, [props.layout, props.plane, readyNv]);

  // the map layer: the component's frame, the threshold and scale, sign and opacity
  const overlay = props.overlay ?? DEFAULT_OVERLAY;
  useEffect(() => {
    const nv = nvRef.current;
    if (!nv || !readyNv || nv.volumes.length < 2) return;
    showMap(nv, latest, mapShown, clustersRef, firstPainted);
  }, [
    props.frame,
    props.threshold,
    props.maxZ,
    overlay.sign,
    overlay.visible,
    overlay.opacity,
    readyNv,
    props.followPeak,
    props.frameReady,
  ]);

  // the desk's keys; the zoom is written on the canvas (data-zoom) for people's tools and the browser tests
  useEffect(() => {
    const setPan = (nv: Niivue, xyzZoom: [number, number, number, number]) => {
      nv.setPan2Dxyzmm(xyzZoom);
      canvasRef.current?.setAttribute('data-zoom', String(xyzZoom[3]));
    };
    const onApi = props.onApi;
    if (!onApi) return;
    onApi({
      nextCluster: () => {
        const nv = nvRef.current;
        if (!nv || nv.volumes.length < 2) return;
        goToCluster(nv, latest.current.frame, clustersRef.current.at + 1, true, clustersRef, latest);
      },
      moveSlice: (d) => {
        const nv = nvRef.current;
        if (!nv) return;
        const p = latest.current.plane ?? 'axial';
        if (p === 'axial') nv.moveCrosshairInVox(0, 0, d);
        else if (p === 'coronal') nv.moveCrosshairInVox(0, d, 0);
        else nv.moveCrosshairInVox(d, 0, 0);
      },
      zoom: (f) => {
        const nv = nvRef.current;
        if (!nv) return;
        const [x, y, z, old] = nv.scene.pan2Dxyzmm;
        const zoom = Math.min(8, Math.max(1, old * f));
        if (zoom === 1) return setPan(nv, [0, 0, 0, 1]);
        const c = nv.frac2mm(nv.scene.crosshairPos);
        const change = old - zoom; // zoom about the crosshair
        setPan(nv, [x + change * c[0], y + change * c[1], z + change * c[2], zoom]);
      },
      pan: (dx, dy) => {
        const nv = nvRef.current;
        if (!nv) return;
        const [x, y, z, zoom] = nv.scene.pan2Dxyzmm;
        const p = latest.current.plane ?? 'axial';
        const step = 10 * zoom; // mm on screen per key
        const v = p === 'axial' ? [dx, dy, 0] : p === 'coronal' ? [dx, 0, dy] : [0, dx, dy];
        setPan(nv, [x + step * v[0], y + step * v[1], z + step * v[2], zoom]);
      },
      resetView: () => {
        const nv = nvRef.current;
        if (nv) setPan(nv, [0, 0, 0, 1]);
      },
    });
    return () => onApi(null);
  }, [props.onApi]);

  return (
    <div className="relative h-full w-full">
      <canvas
        key={sourceKey(props)}
        ref={canvasRef}
        data-testid="viewer-canvas"
        data-zoom="1"
        className="block h-full w-full"
        aria-label="Component map over the mean image"
        role="img"
      />
      {!ready ? (
        <p className="absolute inset-0 flex items-center justify-center text-sm text-ink-muted" data-testid="viewer-loading">
          Loading the run&apos;s maps…
        </p>
      ) : (
        <span
          hidden
          data-testid="viewer-ready"
          data-underlay={
            underlayReady === underlayUrl ? (props.underlayUrl && props.underlayUrl !== props.meanUrl ? 'structural' : 'mean') : 'loading'
          }
        />
      )}
    </div>
  );
}
