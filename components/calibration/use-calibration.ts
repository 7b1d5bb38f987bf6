'use client';

import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { StatResult } from '@/lib/agreement';
import { deleteJson, getJson, postJson } from '@/lib/api/client';
import type { CalibrationThreshold, GateVerdict } from '@/lib/agreement/threshold-gate';
import type { KindSensitivity } from '@/lib/agreement/kind-sensitivity';
import type { CalibrationRoundEntry } from '@/lib/db/queries/calibration-rounds';

/** What GET /api/studies/:id/calibration returns (dates as ISO strings, as JSON carries them). */
export type CalibrationScoreView = {
  n: number;
  percentAgreement: StatResult;
  cohenKappa: StatResult;
  gwetAC1: StatResult;
  noise: { sensitivity: StatResult; specificity: StatResult };
};
export type CalibrationAssignmentView = { raterId: number; raterName: string; labelled: number; submittedAt: string | null };
export type CalibrationRunView = {
  runId: number;
  runName: string;
  status: string;
  total: number;
  referenced: number;
  pending: number;
  assignments: CalibrationAssignmentView[];
};
export type CalibrationRaterView = {
  id: number;
  name: string;
  active: boolean;
  submittedRuns: number;
  score: CalibrationScoreView;
  byKind?: KindSensitivity[];
  gate?: GateVerdict;
  history?: Array<{ runId: number; runName: string; submittedAt: string; stillCalibration: boolean; score: CalibrationScoreView }>;
  rounds?: CalibrationRoundEntry[];
  certification: { passed: boolean; certifiedAt: string | null } | null;
};
export type CalibrationView = {
  studyName: string;
  runs: CalibrationRunView[];
  candidates: Array<{ runId: number; runName: string }>;
  raters: CalibrationRaterView[];
  threshold?: CalibrationThreshold;
  recalibrationWeeks?: number | null;
};

export const calibrationKey = (studyId: number) => ['study-calibration', studyId] as const;

export function useCalibration(studyId: number, initialData: CalibrationView) {
  return useQuery({
    queryKey: calibrationKey(studyId),
    initialData,
    staleTime: 5_000,
    refetchInterval: 30_000,
    queryFn: async () => {
      const r = await getJson<CalibrationView>(`/api/studies/${studyId}/calibration`);
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
  });
}

/** One POST (or DELETE) under /api/studies/:id/calibration that refreshes the page's data when done; throws with the server's message. */
export function useCalibrationAction(studyId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async ({ path, body, method = 'POST' }: { path: string; body: unknown; method?: 'POST' | 'DELETE' }) => {
      const url = `/api/studies/${studyId}/calibration${path}`;
      const r = method === 'DELETE' ? await deleteJson(url) : await postJson(url, body);
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
    onSettled: () => qc.invalidateQueries({ queryKey: calibrationKey(studyId) }),
  });
}
