'use client';
import dynamic from 'next/dynamic';
import type { VolumeViewerProps } from './volume-viewer';

export type { FrameInfo, ViewerApi, ViewerLocation, VolumeViewerProps } from './volume-viewer';

const loadViewer = () => import('./volume-viewer');

// In the browser the viewer's code (≈ 0.9 MB, the WebGL library) is asked for as soon as a page
// that shows it has its scripts running, not when the viewer first renders after hydration: it
// downloads and compiles while the page hydrates.
if (typeof window !== 'undefined') loadViewer().catch(() => undefined); // a failure is reported when the viewer renders

/** The volume viewer, loaded only in the browser (WebGL). */
export const VolumeViewer = dynamic<VolumeViewerProps>(loadViewer, {
  ssr: false,
  loading: () => <div className="h-full w-full animate-pulse bg-ground-sunken" data-testid="viewer-loading" />,
});
