'use client';
/**
 * Loads a run's component maps for the desk from the map payload (map-payload.ts): the layout,
 * then the shown component's map at once, then its neighbours, then the rest in small chunks in
 * the background. A component the rater jumps to before it arrived is fetched ahead of the queue.
 */
import { useEffect, useLayoutEffect, useMemo, useRef, useState } from 'react';
import { decodeLayout, decodeMaps, emptyMapVolume, expandMap, type MapLayout, type QuantisedMaps } from './map-payload';

/** What the viewer needs from the loaded maps. */
export type MapFrames = {
  /** Number of maps. */
  k: number;
  /** The viewer's map volume (NIfTI-1, one float32 frame on the grid, zero); the viewer writes the shown map into it. */
  emptyVolume: () => ArrayBuffer;
  /** Frame `i`'s z-map on the whole grid (0-based), or null while it has not arrived. */
  frame: (i: number) => Float32Array | null;
};

const CHUNK = 8;
const BACKGROUND_IN_FLIGHT = 2;

type Store = { layout: MapLayout; got: Array<{ maps: QuantisedMaps; c: number } | undefined> };

async function fetchBytes(url: string, signal: AbortSignal): Promise<Uint8Array> {
  const res = await fetch(url, { signal });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
    throw new Error(body?.error?.message ?? `the server answered ${res.status}`);
  }
  return new Uint8Array(await res.arrayBuffer());
}

/** Frames in the order to fetch them: the shown one, its neighbours, then outwards. */
export function fetchOrder(k: number, current: number): number[] {
  const out = [current];
  for (let d = 1; out.length < k; d++) {
    if (current + d < k) out.push(current + d);
    if (current - d >= 0) out.push(current - d);
  }
  return out;
}

/**
 * `base`: the payload's address without the part, e.g. `/api/runs/5/maps`; `version`: the
 * decomposition id (a new decomposition is a new address). `frame`: the shown component (0-based).
 * Returns the frames source once the layout is in, whether `frame` has arrived, and an error text.
 */
export function useDeskMaps(base: string | null, version: number, frame: number) {
  const [store, setStore] = useState<Store | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [arrived, setArrived] = useState(0); // bumps when maps arrive, to re-render a waiting desk
  const want = useRef(frame);
  const kick = useRef<(() => void) | null>(null);
  useLayoutEffect(() => {
    want.current = frame;
  });

  useEffect(() => {
    if (!base) return;
    const abort = new AbortController();
    let s: Store | null = null;
    const pending = new Set<number>();
    let background = 0;
    const url = (part: string) => `${base}/${part}?d=${version}`;

    const fetchRange = async (from: number, to: number) => {
      for (let i = from; i <= to; i++) pending.add(i);
      try {
        const maps = decodeMaps(await fetchBytes(url(`${from + 1}-${to + 1}`), abort.signal));
        if (maps.from !== from + 1 || maps.count !== to - from + 1) throw new Error('the server sent other maps than asked for');
        for (let c = 0; c < maps.count; c++) s!.got[from + c] = { maps, c };
        if (want.current >= from && want.current <= to) setArrived((n) => n + 1);
      } finally {
        for (let i = from; i <= to; i++) pending.delete(i);
      }
    };
    const fail = (err: Error) => {
      if (!abort.signal.aborted) setError(`The maps could not be loaded: ${err.message}`);
    };

    // the next chunk of missing frames, nearest the shown one first
    const nextChunk = (): [number, number] | null => {
      const first = fetchOrder(s!.layout.k, want.current).find((i) => !s!.got[i] && !pending.has(i));
      if (first === undefined) return null;
      const missing = (i: number) => i >= 0 && i < s!.layout.k && !s!.got[i] && !pending.has(i);
      // grow the chunk away from the shown frame
      let [from, to] = [first, first];
      if (first < want.current) while (first - from + 1 < CHUNK && missing(from - 1)) from--;
      else while (to - first + 1 < CHUNK && missing(to + 1)) to++;
      return [from, to];
    };
    const pump = () => {
      if (!s || abort.signal.aborted) return;
      const w = want.current;
      if (!s.got[w] && !pending.has(w)) void fetchRange(w, w).then(pump, fail); // jumped ahead of the queue
      while (background < BACKGROUND_IN_FLIGHT) {
        const next = nextChunk();
        if (!next) return;
        background++;
        void fetchRange(next[0], next[1])
          .finally(() => background--)
          .then(pump, fail);
      }
    };
    kick.current = pump;

    (async () => {
      // the layout and the shown map together (the page asked for both ahead: the rating page's preloads)
      const w = want.current;
      const [layoutBytes, first] = await Promise.all([
        fetchBytes(url('layout'), abort.signal),
        fetchBytes(url(`${w + 1}-${w + 1}`), abort.signal),
      ]);
      const layout = decodeLayout(layoutBytes);
      s = { layout, got: new Array(layout.k) };
      const maps = decodeMaps(first);
      if (maps.from !== w + 1 || maps.count !== 1) throw new Error('the server sent other maps than asked for');
      s.got[w] = { maps, c: 0 };
      setStore(s);
      pump();
    })().catch(fail);
    return () => {
      abort.abort();
      kick.current = null;
      setStore(null);
    };
  }, [base, version]);

  // a jump to a frame that has not arrived fetches it at once
  useEffect(() => {
    if (store && !store.got[frame]) kick.current?.();
  }, [frame, store]);

  const source = useMemo<MapFrames | null>(() => {
    if (!store) return null;
    return {
      k: store.layout.k,
      emptyVolume: () => emptyMapVolume(store.layout),
      frame: (i) => {
        const g = store.got[i];
        return g ? expandMap(store.layout, g.maps, g.c) : null;
      },
    };
  }, [store]);

  const ready = Boolean(store?.got[frame]);
  return { maps: source, frameReady: ready, error, arrived };
}
