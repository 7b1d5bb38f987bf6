'use client';
import { useEffect } from 'react';

/** The User Timing mark set once the viewer's code has been fetched and run by a warm-up. */
export const VIEWER_CODE_MARK = 'viewer:code-loaded';

/**
 * Fetches and runs the viewer's code (≈ 0.9 MB, the WebGL library) while the browser is idle, on a
 * page from which the viewer is usually opened next (the rater's queue; a study's runs table, for the
 * run view and Reconcile). The desk then finds it loaded, instead of asking for it while the page
 * hydrates: a rater's first visit in a fresh browser waited ≈ 0.3 s for it. Renders nothing; a failure is
 * ignored here (the desk asks again and reports it).
 */
export function ViewerWarmUp() {
  useEffect(() => {
    let cancelled = false;
    const warm = () => {
      import('./volume-viewer')
        .then(() => {
          if (!cancelled && performance.getEntriesByName(VIEWER_CODE_MARK).length === 0) performance.mark(VIEWER_CODE_MARK);
        })
        .catch(() => undefined);
    };
    // requestIdleCallback is missing in some browsers: a timeout after the page's own work there
    if (typeof window.requestIdleCallback === 'function') {
      const handle = window.requestIdleCallback(warm, { timeout: 2000 });
      return () => {
        cancelled = true;
        window.cancelIdleCallback(handle);
      };
    }
    const handle = window.setTimeout(warm, 200);
    return () => {
      cancelled = true;
      window.clearTimeout(handle);
    };
  }, []);
  return null;
}
