'use client';
import { useCallback, useEffect, useRef } from 'react';
import { putJson } from '@/lib/api/client';

/** How long after the last move the position is sent (ms); a page that goes away sends it at once. */
const SEND_AFTER_MS = 400;

type Pending = { componentIdx: number; at: number };

const keyFor = (userId: number, runId: number) => `quorum.desk.position.v1.${userId}.${runId}`;

function readPending(key: string): Pending | null {
  try {
    const raw = JSON.parse(localStorage.getItem(key) ?? 'null') as Pending | null;
    return raw && Number.isInteger(raw.componentIdx) && raw.componentIdx >= 1 ? raw : null;
  } catch {
    return null;
  }
}

function writePending(key: string, value: Pending | null) {
  try {
    if (value) localStorage.setItem(key, JSON.stringify(value));
    else localStorage.removeItem(key);
  } catch {
    /* private mode: the server copy is all there is */
  }
}

/**
 * Remembers which component (1-based) a rater is on, so the desk reopens there (WALKTHROUGH:
 * "she closes the tab mid-run and continues the next day where she stopped"). Each move is kept in
 * localStorage at once, synchronously with the key press, and sent to `PUT /api/runs/:id/desk`
 * shortly after; the local copy is dropped only once the server has acknowledged that same
 * position. A page that goes away (reload, closed tab, hidden) sends the pending position with a
 * keepalive request. `pendingIdx()` gives the position the server may not have yet, for the desk
 * to reopen at after a reload that outran the request.
 */
export function useDeskPosition(runId: number, userId: number, componentCount: number) {
  const key = keyFor(userId, runId);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);

  const send = useCallback(
    async (componentIdx: number) => {
      const res = await putJson(`/api/runs/${runId}/desk`, { componentIdx });
      // Acknowledged, or refused for good (4xx: the run changed or is no longer assigned): forget it.
      const final = res.ok || (res.status >= 400 && res.status < 500);
      if (final && readPending(key)?.componentIdx === componentIdx) writePending(key, null);
    },
    [key, runId],
  );

  /** Records a move: kept locally now, sent after a short pause. */
  const remember = useCallback(
    (componentIdx: number) => {
      writePending(key, { componentIdx, at: Date.now() });
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => void send(componentIdx), SEND_AFTER_MS);
    },
    [key, send],
  );

  const pendingIdx = useCallback((): number | null => {
    const p = readPending(key);
    return p && p.componentIdx <= componentCount ? p.componentIdx : null;
  }, [key, componentCount]);

  useEffect(() => {
    // A position not yet acknowledged (from a page that went away too fast) is sent now.
    const p = readPending(key);
    if (p) void send(p.componentIdx);
    const flush = () => {
      const pending = readPending(key);
      if (!pending) return;
      if (timer.current) clearTimeout(timer.current);
      try {
        void fetch(`/api/runs/${runId}/desk`, {
          method: 'PUT',
          keepalive: true,
          headers: { 'Content-Type': 'application/json' },
          body: JSON.stringify({ componentIdx: pending.componentIdx }),
        }).catch(() => undefined);
      } catch {
        /* the local copy stays and is sent on the next visit */
      }
    };
    const onVisibility = () => {
      if (document.visibilityState === 'hidden') flush();
    };
    window.addEventListener('pagehide', flush);
    document.addEventListener('visibilitychange', onVisibility);
    return () => {
      window.removeEventListener('pagehide', flush);
      document.removeEventListener('visibilitychange', onVisibility);
      if (timer.current) clearTimeout(timer.current);
    };
  }, [key, runId, send]);

  return { remember, pendingIdx };
}
