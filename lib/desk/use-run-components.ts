'use client';
import { useQuery } from '@tanstack/react-query';
import { getJson } from '@/lib/api/client';
import type { ComponentsPayload } from './types';

export const componentsKey = (runId: number) => ['desk', runId, 'components'] as const;

/** The run's components for the desk; static for one decomposition, so fetched once per session. */
export function useRunComponents(runId: number, initialData?: ComponentsPayload) {
  return useQuery({
    queryKey: componentsKey(runId),
    queryFn: async () => {
      const res = await getJson<ComponentsPayload>(`/api/runs/${runId}/components`);
      if (!res.ok) throw new Error(res.message);
      return res.data;
    },
    initialData,
    staleTime: Infinity,
    refetchOnWindowFocus: false,
  });
}
