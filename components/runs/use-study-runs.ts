'use client';

import { useQuery } from '@tanstack/react-query';
import { getJson } from '@/lib/api/client';
import type { RunListItem, StudyProgress } from '@/lib/db/queries/runs';

export type StudyRunsData = { runs: RunListItem[]; progress: StudyProgress };

export const studyRunsKey = (studyId: number) => ['study-runs', studyId] as const;

/** The study's runs and progress; polled every 1.5 s while any run is queued or processing. */
export function useStudyRuns(studyId: number, initialData: StudyRunsData) {
  return useQuery({
    queryKey: studyRunsKey(studyId),
    initialData,
    staleTime: 1_000,
    queryFn: async () => {
      const r = await getJson<StudyRunsData>(`/api/studies/${studyId}/runs`);
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
    refetchInterval: (query) =>
      query.state.data?.runs.some((run) => run.status === 'queued' || run.status === 'processing') ? 1_500 : false,
  });
}
