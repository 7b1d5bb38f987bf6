'use client';

import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { callJson, dataOrThrow, getJson } from '@/lib/api/client';

/** What GET /api/studies/:id/assignments returns (dates as ISO strings, as JSON carries them). */
export type AssignmentCell = {
  raterId: number;
  raterName: string;
  dueAt: string | null;
  labelled: number;
  submittedAt: string | null;
  reopenCount: number;
  notifiedAt: string | null;
  overdue: boolean;
};
export type AssignmentRow = {
  runId: number;
  runName: string;
  status: string;
  total: number;
  pending: number;
  assignments: AssignmentCell[];
};
export type RaterOption = { id: number; name: string; open: number; certified: boolean | null };
export type StudyAssignments = { runs: AssignmentRow[]; raters: RaterOption[] };

export const studyAssignmentsKey = (studyId: number) => ['study-assignments', studyId] as const;

export function useStudyAssignments(studyId: number, initialData: StudyAssignments) {
  return useQuery({
    queryKey: studyAssignmentsKey(studyId),
    initialData,
    staleTime: 5_000,
    refetchInterval: 30_000,
    queryFn: async () => {
      const r = await getJson<StudyAssignments>(`/api/studies/${studyId}/assignments`);
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
  });
}

/** One JSON call (any method); throws ApiCallError with the server's message. */
export async function callAssignments<T = unknown>(method: 'POST' | 'PATCH' | 'DELETE', url: string, body?: unknown): Promise<T> {
  return dataOrThrow(await callJson<T>(method, url, body));
}

/** A change to the study's assignments that refreshes the table when it is done. */
export function useAssignmentChange<V>(studyId: number, run: (v: V) => Promise<unknown>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: run, onSettled: () => qc.invalidateQueries({ queryKey: studyAssignmentsKey(studyId) }) });
}
