'use client';
import { useCallback, useEffect, useRef } from 'react';
import { putJson } from '@/lib/api/client';

/** How long after the last move the position is sent (ms); a page that goes away sends it at once. */
const SEND_AFTER_MS = 400;
/**
 * How long an acknowledged position still wins over the one the server rendered (ms). A reload can
 * be rendered from the database while the acknowledgement of the last move is still on its way, so
 * for a short while this browser's own record is the better one; after it, the server's (which may
 * come from another device) is.
 */
const TRUST_ACKNOWLEDGED_MS = 120_000;

/** A position this browser recorded; ackedAt (this browser's clock) once the server confirmed it. */
type Pending = { componentIdx: number; at: number; ackedAt?: number };

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
 * shortly after; a page that goes away (reload, closed tab, hidden) sends an unacknowledged
 * position with a keepalive request. `pendingIdx()` gives this browser's own record — unacknowledged,
 * or acknowledged within TRUST_ACKNOWLEDGED_MS — for the desk to reopen at when a reload outran
 * the request or its acknowledgement; otherwise the server's position stands.
 */
export function useDeskPosition(runId: number, userId: number, componentCount: number) {
  const key = keyFor(userId, runId);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);

  const send = useCallback(
    async (componentIdx: number) => {
      const res = await putJson(`/api/runs/${runId}/desk`, { componentIdx });
      // Acknowledged, or refused for good (4xx: the run changed or is no longer assigned): forget it.
      const current = readPending(key);
      if (current?.componentIdx !== componentIdx) return;
      if (res.ok) writePending(key, { ...current, ackedAt: Date.now() });
      else if (res.status >= 400 && res.status < 500) writePending(key, null);
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
    if (!p || p.componentIdx > componentCount) return null;
    if (p.ackedAt !== undefined && Date.now() - p.ackedAt > TRUST_ACKNOWLEDGED_MS) return null;
    return p.componentIdx;
  }, [key, componentCount]);

  useEffect(() => {
    // A position not yet acknowledged (from a page that went away too fast) is sent now.
    const p = readPending(key);
    if (p && p.ackedAt === undefined) void send(p.componentIdx);
    const flush = () => {
      const pending = readPending(key);
      if (!pending || pending.ackedAt !== undefined) return;
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
