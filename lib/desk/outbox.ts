/**
 * The desk's outbox: vote changes not yet acknowledged by the server, kept in localStorage so they
 * survive a reload, a closed tab or a dropped network, and shared by every tab of the same rater
 * on the same run (a change made in one tab is merged, field by field, with the other's).
 * Layout: { [componentId]: { fields, baseVersion, queuedAt } }.
 */
import type { VoteFields } from './types';

export type PendingChange = { fields: Partial<VoteFields>; baseVersion: number; queuedAt: number };
export type OutboxState = Record<string, PendingChange>;

const listeners = new Set<() => void>();
const cache = new Map<string, { raw: string | null; state: OutboxState }>();
const EMPTY: OutboxState = {};

export function outboxKey(userId: number, runId: number): string {
  return `quorum.desk.outbox.v1.${userId}.${runId}`;
}

function storage(): Storage | null {
  try {
    return typeof window === 'undefined' ? null : window.localStorage;
  } catch {
    return null;
  }
}

/** The current outbox (the same object until it changes, for useSyncExternalStore). */
export function readOutbox(key: string): OutboxState {
  const raw = storage()?.getItem(key) ?? null;
  const hit = cache.get(key);
  if (hit && hit.raw === raw) return hit.state;
  let state: OutboxState = EMPTY;
  if (raw) {
    try {
      state = JSON.parse(raw) as OutboxState;
    } catch {
      state = EMPTY;
    }
  }
  cache.set(key, { raw, state });
  return state;
}

function writeOutbox(key: string, state: OutboxState): void {
  const s = storage();
  if (!s) return;
  if (Object.keys(state).length === 0) s.removeItem(key);
  else s.setItem(key, JSON.stringify(state));
  for (const l of listeners) l();
}

/** Adds a change: later values of a field replace earlier ones; the first base version is kept. */
export function queueChange(key: string, componentId: number, fields: Partial<VoteFields>, baseVersion: number): void {
  const state = { ...readOutbox(key) };
  const prev = state[componentId];
  state[componentId] = {
    fields: { ...(prev?.fields ?? {}), ...fields },
    baseVersion: prev ? prev.baseVersion : baseVersion,
    queuedAt: prev?.queuedAt ?? Date.now(),
  };
  writeOutbox(key, state);
}

/**
 * Removes what the server acknowledged: each sent field whose queued value is still the sent one
 * (a field changed again while the request was in flight stays queued, on the new version).
 */
export function acknowledge(key: string, componentId: number, sent: Partial<VoteFields>, newVersion: number): void {
  const state = { ...readOutbox(key) };
  const entry = state[componentId];
  if (!entry) return;
  const left: Partial<VoteFields> = { ...entry.fields };
  for (const f of Object.keys(sent) as (keyof VoteFields)[]) {
    if (left[f] === sent[f]) delete left[f];
  }
  if (Object.keys(left).length === 0) delete state[componentId];
  else state[componentId] = { ...entry, fields: left, baseVersion: newVersion };
  writeOutbox(key, state);
}

/** A failure worth sending again (no answer, timeout, throttled, server or database down); others are refusals. */
export function isTransient(status: number): boolean {
  return status === 0 || status === 408 || status === 429 || status >= 500;
}

/** Drops a change the server refused (it will not succeed on retry). */
export function dropChange(key: string, componentId: number): void {
  const state = { ...readOutbox(key) };
  delete state[componentId];
  writeOutbox(key, state);
}

/** Subscribes to changes from this tab and (through the storage event) from other tabs. */
export function subscribeOutbox(listener: () => void): () => void {
  listeners.add(listener);
  const onStorage = (e: StorageEvent) => {
    if (e.key === null || e.key.startsWith('quorum.desk.outbox.')) listener();
  };
  window.addEventListener('storage', onStorage);
  return () => {
    listeners.delete(listener);
    window.removeEventListener('storage', onStorage);
  };
}

const PREFIX = 'quorum.desk.outbox.';

/** Vote changes of any run still waiting in this browser (for the sign-out warning). */
export function pendingChangesInBrowser(): number {
  const s = storage();
  if (!s) return 0;
  let n = 0;
  for (let i = 0; i < s.length; i++) {
    const key = s.key(i);
    if (key?.startsWith(PREFIX)) n += Object.keys(readOutbox(key)).length;
  }
  return n;
}

/** Forgets every outbox in this browser (at sign-out: the next person must not inherit them). */
export function clearOutboxes(): void {
  const s = storage();
  if (!s) return;
  const keys: string[] = [];
  for (let i = 0; i < s.length; i++) {
    const key = s.key(i);
    if (key?.startsWith(PREFIX)) keys.push(key);
  }
  for (const key of keys) s.removeItem(key);
  for (const listener of listeners) listener();
}
