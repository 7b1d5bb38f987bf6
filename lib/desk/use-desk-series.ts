'use client';
/**
 * The desk's time courses and spectra: the shown component's come with the page; the others' in
 * one binary payload (series-payload.ts) fetched once while the page starts.
 */
import { useCallback, useEffect, useState } from 'react';
import { decodeSeries, deskSeriesUrl, type SeriesSource } from './series-payload';
import type { ComponentSeries, DeskPagePayload } from './types';

/** `seriesOf(id)`: a component's series, or null while the payload is on its way; `error`: why it could not be loaded. */
export function useDeskSeries(runId: number, decompositionId: number, shown: DeskPagePayload['shown']) {
  const [source, setSource] = useState<SeriesSource | null>(null);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    const abort = new AbortController();
    (async () => {
      const res = await fetch(deskSeriesUrl(runId, decompositionId), { signal: abort.signal });
      if (!res.ok) {
        const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
        throw new Error(body?.error?.message ?? `the server answered ${res.status}`);
      }
      setSource(decodeSeries(new Uint8Array(await res.arrayBuffer())));
    })().catch((err: Error) => {
      if (!abort.signal.aborted) setError(`The time courses could not be loaded: ${err.message}. Reload the page to try again.`);
    });
    return () => abort.abort();
  }, [runId, decompositionId]);
  const seriesOf = useCallback(
    (id: number): ComponentSeries | null => (shown && shown.id === id ? shown : (source?.of(id) ?? null)),
    [shown, source],
  );
  return { seriesOf, error };
}
