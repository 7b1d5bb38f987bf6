'use client';
import { useCallback, useEffect, useMemo, useRef, useState, useSyncExternalStore } from 'react';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { getJson, putJson } from '@/lib/api/client';
import { acknowledge, dropChange, isTransient, outboxKey, queueChange, readOutbox, subscribeOutbox, type OutboxState } from './outbox';
import type { MyVote, SaveVoteResult, VoteFields, VotesPayload } from './types';

export const votesKey = (runId: number) => ['desk', runId, 'votes'] as const;

/** A vote as the desk shows it: the server's, with this rater's unsent changes on top. */
export type ShownVote = Partial<VoteFields> & { componentId: number; version: number; pending: boolean };

export type SyncState = {
  /** Components with changes the server has not acknowledged. */
  unsaved: number;
  phase: 'saved' | 'saving' | 'retrying';
  /** The last refusal (a change the server will never accept), to show the rater. */
  refusal: string | null;
};

const RETRY_MS = [1000, 2000, 4000, 8000, 15000];
const EMPTY_OUTBOX: OutboxState = {};

/**
 * The rater's votes on one run, saved as they are made:
 * - `setVote` writes the change into the react-query cache at once (optimistic) and into the
 *   localStorage outbox (so it survives reloads and is shared with other tabs);
 * - a sender PUTs each queued change with the version it was based on; the server merges field by
 *   field; network failures are retried with backoff ("n unsaved, retrying"), refusals are dropped
 *   and reported, and the cache is refreshed from the server;
 * - other tabs learn about acknowledged votes through a BroadcastChannel.
 */
export function useVotes({ runId, userId, initialData }: { runId: number; userId: number; initialData?: VotesPayload }) {
  const queryClient = useQueryClient();
  const key = outboxKey(userId, runId);
  const query = useQuery({
    queryKey: votesKey(runId),
    queryFn: async () => {
      const res = await getJson<VotesPayload>(`/api/runs/${runId}/votes`);
      if (!res.ok) throw new Error(res.message);
      return res.data;
    },
    initialData,
    staleTime: 10_000,
  });

  const outbox = useSyncExternalStore(
    subscribeOutbox,
    () => readOutbox(key),
    () => EMPTY_OUTBOX,
  );

  const [phase, setPhase] = useState<SyncState['phase']>('saved');
  const [refusal, setRefusal] = useState<string | null>(null);
  const sending = useRef(false);
  const attempt = useRef(0);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const channel = useRef<BroadcastChannel | null>(null);

  const applyServerVote = useCallback(
    (vote: MyVote) => {
      queryClient.setQueryData<VotesPayload>(votesKey(runId), (old) => {
        if (!old) return old;
        const mine = old.mine.filter((v) => v.componentId !== vote.componentId);
        const prev = old.mine.find((v) => v.componentId === vote.componentId);
        if (prev && prev.version > vote.version) return old;
        return { ...old, mine: [...mine, vote] };
      });
    },
    [queryClient, runId],
  );

  const flush = useCallback(async () => {
    if (sending.current) return;
    sending.current = true;
    if (timer.current) clearTimeout(timer.current);
    timer.current = null;
    const work = async () => {
      for (;;) {
        const state = readOutbox(key);
        const ids = Object.keys(state);
        if (ids.length === 0) {
          setPhase('saved');
          attempt.current = 0;
          return;
        }
        setPhase((p) => (p === 'retrying' ? p : 'saving'));
        const componentId = Number(ids[0]);
        const entry = state[ids[0]];
        const sent = { ...entry.fields };
        const res = await putJson<SaveVoteResult>(`/api/runs/${runId}/votes/${componentId}`, { ...sent, baseVersion: entry.baseVersion });
        if (res.ok) {
          attempt.current = 0;
          acknowledge(key, componentId, sent, res.data.vote.version);
          applyServerVote(res.data.vote);
          channel.current?.postMessage({ type: 'vote', vote: res.data.vote });
          setPhase('saving');
          continue;
        }
        if (isTransient(res.status)) {
          setPhase('retrying');
          const delay = RETRY_MS[Math.min(attempt.current, RETRY_MS.length - 1)];
          attempt.current++;
          timer.current = setTimeout(() => void flush(), delay);
          return;
        }
        // refused: it will never succeed; drop it, say why, and show the server's state again
        dropChange(key, componentId);
        setRefusal(res.message);
        await queryClient.invalidateQueries({ queryKey: votesKey(runId) });
      }
    };
    try {
      const locks = typeof navigator !== 'undefined' ? navigator.locks : undefined;
      if (locks) await locks.request(`quorum-desk-send-${key}`, work);
      else await work();
    } finally {
      sending.current = false;
    }
  }, [key, runId, applyServerVote, queryClient]);

  // send whatever is queued: on mount (changes kept from an earlier visit), when the outbox
  // changes, when the browser is back online
  const pendingCount = Object.keys(outbox).length;
  useEffect(() => {
    if (pendingCount > 0 && !sending.current && !timer.current) void flush();
  }, [pendingCount, outbox, flush]);
  useEffect(() => {
    const online = () => {
      attempt.current = 0;
      void flush();
    };
    window.addEventListener('online', online);
    return () => window.removeEventListener('online', online);
  }, [flush]);
  useEffect(() => {
    if (typeof BroadcastChannel === 'undefined') return;
    const ch = new BroadcastChannel(`quorum-desk-${userId}-${runId}`);
    ch.onmessage = (e: MessageEvent<{ type: string; vote: MyVote }>) => {
      if (e.data?.type === 'vote') applyServerVote(e.data.vote);
    };
    channel.current = ch;
    return () => {
      ch.close();
      channel.current = null;
    };
  }, [userId, runId, applyServerVote]);
  useEffect(
    () => () => {
      if (timer.current) clearTimeout(timer.current);
    },
    [],
  );

  const data = query.data;
  const votes = useMemo(() => {
    const map = new Map<number, ShownVote>();
    for (const v of data?.mine ?? []) map.set(v.componentId, { ...v, pending: false });
    for (const [id, change] of Object.entries(outbox)) {
      const componentId = Number(id);
      const base = map.get(componentId);
      const shown: ShownVote = { ...(base ?? { componentId, version: 0 }), ...change.fields, pending: true };
      if (shown.label !== undefined && shown.label !== 'noise') shown.noiseKind = null;
      map.set(componentId, shown);
    }
    return map;
  }, [data, outbox]);

  /** Records a change at once (optimistically) and queues it for the server. */
  const setVote = useCallback(
    (componentId: number, fields: Partial<VoteFields>) => {
      setRefusal(null);
      const current = queryClient.getQueryData<VotesPayload>(votesKey(runId));
      const serverVote = current?.mine.find((v) => v.componentId === componentId);
      const shown = votes.get(componentId);
      if (!fields.label && !shown?.label) {
        setRefusal('Choose signal, noise or uncertain first; then add a kind, confidence or note.');
        return;
      }
      queueChange(key, componentId, fields, serverVote?.version ?? 0);
      if (serverVote) {
        queryClient.setQueryData<VotesPayload>(votesKey(runId), (old) =>
          old ? { ...old, mine: old.mine.map((v) => (v.componentId === componentId ? { ...v, ...fields } : v)) } : old,
        );
      }
    },
    [queryClient, runId, key, votes],
  );

  const sync: SyncState = { unsaved: pendingCount, phase: pendingCount === 0 ? 'saved' : phase, refusal };
  return { query, votes, status: data?.status, others: data?.others ?? null, setVote, sync, flush, clearRefusal: () => setRefusal(null) };
}
