'use client';
import { useCallback, useEffect, useState } from 'react';

/**
 * The rater's own "come back to this" flags on a run's components, kept in this browser
 * (localStorage, per run and rater); they are a reading aid, not part of the vote.
 */
export function useFlags(runId: number, userId: number) {
  const key = `quorum.desk.flags.v1.${runId}.${userId}`;
  const [flags, setFlags] = useState<Set<number>>(() => new Set());
  useEffect(() => {
    try {
      // eslint-disable-next-line react-hooks/set-state-in-effect -- localStorage exists only after hydration
      setFlags(new Set(JSON.parse(localStorage.getItem(key) ?? '[]') as number[]));
    } catch {
      /* unreadable: start empty */
    }
  }, [key]);
  const toggle = useCallback(
    (componentId: number) =>
      setFlags((old) => {
        const next = new Set(old);
        if (!next.delete(componentId)) next.add(componentId);
        try {
          localStorage.setItem(key, JSON.stringify([...next]));
        } catch {
          /* private mode */
        }
        return next;
      }),
    [key],
  );
  return { flags, toggle };
}
