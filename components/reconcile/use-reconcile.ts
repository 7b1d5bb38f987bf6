'use client';
import { useQuery } from '@tanstack/react-query';
import { getJson } from '@/lib/api/client';
import type { ReconcileItem } from '@/lib/db/queries/reconcile';
import type { ComponentsPayload } from '@/lib/desk/types';

async function unwrap<T>(p: Promise<{ ok: true; data: T } | { ok: false; message: string }>): Promise<T> {
  const r = await p;
  if (!r.ok) throw new Error(r.message);
  return r.data;
}

/** The lead's queue for a study, with optional run / noise-kind filters. */
export function useReconcileItems(
  studyId: number,
  filters: { runId?: number; noiseKind?: string; include: 'pending' | 'all' },
  initial?: ReconcileItem[],
) {
  const q = new URLSearchParams({ include: filters.include });
  if (filters.runId) q.set('runId', String(filters.runId));
  if (filters.noiseKind) q.set('noiseKind', filters.noiseKind);
  const isDefault = !filters.runId && !filters.noiseKind && filters.include === 'pending';
  return useQuery({
    queryKey: ['reconcile', studyId, filters],
    queryFn: () => unwrap(getJson<{ items: ReconcileItem[] }>(`/api/studies/${studyId}/reconcile?${q}`)).then((d) => d.items),
    initialData: isDefault ? initial : undefined,
  });
}

/** One run's components as the lead reconciles them (loaded once per run, kept for the session). */
export function useReconcileRun(runId: number | null) {
  return useQuery({
    queryKey: ['reconcile-run', runId],
    enabled: runId != null,
    staleTime: Infinity,
    queryFn: () => unwrap(getJson<ComponentsPayload>(`/api/reconcile/runs/${runId}/components`)),
  });
}
