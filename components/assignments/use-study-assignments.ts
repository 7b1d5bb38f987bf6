'use client';

import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { getJson } from '@/lib/api/client';

/** What GET /api/studies/:id/assignments returns (dates as ISO strings, as JSON carries them). */
export type AssignmentCell = { raterId: number; raterName: string; dueAt: string | null; labelled: number; submittedAt: string | null; reopenCount: number; notifiedAt: string | null; overdue: boolean };
export type AssignmentRow = { runId: number; runName: string; status: string; total: number; pending: number; assignments: AssignmentCell[] };
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

export class AssignmentCallError extends Error {
  constructor(message: string, readonly status: number, readonly fields?: Record<string, string[]>) {
    super(message);
  }
}

/** One JSON call (any method); throws AssignmentCallError with the server's message. */
export async function callAssignments<T = unknown>(method: 'POST' | 'PATCH' | 'DELETE', url: string, body?: unknown): Promise<T> {
  let res: Response;
  try {
    res = await fetch(url, { method, headers: body === undefined ? undefined : { 'Content-Type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) });
  } catch {
    throw new AssignmentCallError('The server cannot be reached. Check your connection and try again.', 0);
  }
  const payload = await res.json().catch(() => null);
  if (!res.ok) throw new AssignmentCallError(payload?.error?.message ?? `The server answered ${res.status}.`, res.status, payload?.error?.fields);
  return payload as T;
}

/** A change to the study's assignments that refreshes the table when it is done. */
export function useAssignmentChange<V>(studyId: number, run: (v: V) => Promise<unknown>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: run, onSettled: () => qc.invalidateQueries({ queryKey: studyAssignmentsKey(studyId) }) });
}
