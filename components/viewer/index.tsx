'use client';
import dynamic from 'next/dynamic';
import type { VolumeViewerProps } from './volume-viewer';

export type { FrameInfo, ViewerApi, ViewerLocation, VolumeViewerProps } from './volume-viewer';

/** The volume viewer, loaded only in the browser (WebGL). */
export const VolumeViewer = dynamic<VolumeViewerProps>(() => import('./volume-viewer'), {
  ssr: false,
  loading: () => <div className="h-full w-full animate-pulse bg-ground-sunken" data-testid="viewer-loading" />,
});
