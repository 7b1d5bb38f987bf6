'use client';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { getJson, postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';

type DenoiseJob = {
  jobId: number;
  status: string;
  stage: string | null;
  percent: number | null;
  message: string | null;
  mode: string | null;
  includeMotion: boolean;
  releaseId: number | null;
  file: { name: string; sha256: string; bytes: number; url: string } | null;
};

/** Per released run: ask the worker for denoised data and follow the job until a download link appears. */
export function DenoiseControl({ runId, releaseId, canRequest }: { runId: number; releaseId: number; canRequest: boolean }) {
  const qc = useQueryClient();
  const [mode, setMode] = useState<'partial' | 'full'>('partial');
  const [motion, setMotion] = useState(false);
  const key = ['denoise', runId];
  const jobs = useQuery({
    queryKey: key,
    queryFn: async () => {
      const r = await getJson<{ jobs: DenoiseJob[] }>(`/api/runs/${runId}/denoise`);
      if (!r.ok) throw new Error(r.message);
      return r.data.jobs.filter((j) => j.releaseId === releaseId);
    },
    refetchInterval: (q) => (q.state.data?.some((j) => j.status === 'queued' || j.status === 'running') ? 2000 : false),
  });
  const request = useMutation({
    mutationFn: async () => {
      const r = await postJson<{ jobId: number }>(`/api/runs/${runId}/denoise`, { releaseId, mode, includeMotion: motion });
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: key }),
  });
  const latest = jobs.data?.[0];
  return (
    <div className="flex flex-wrap items-center gap-2 text-xs" data-testid={`denoise-${runId}`}>
      {canRequest ? (
        <>
          <select
            aria-label="Regression"
            value={mode}
            onChange={(e) => setMode(e.target.value as 'partial' | 'full')}
            className="rounded border border-line-strong bg-ground-sunken px-1 py-0.5"
          >
            <option value="partial">partial (fit all, remove noise part)</option>
            <option value="full">full (noise courses only)</option>
          </select>
          <label className="flex items-center gap-1">
            <input type="checkbox" checked={motion} onChange={(e) => setMotion(e.target.checked)} /> + motion
          </label>
          <Button
            variant="quiet"
            className="px-2 py-0.5 text-xs"
            onClick={() => request.mutate()}
            disabled={request.isPending}
            data-testid={`denoise-request-${runId}`}
          >
            Denoise
          </Button>
        </>
      ) : null}
      {request.error ? <span className="text-alarm">{request.error.message}</span> : null}
      {latest ? (
        latest.file ? (
          <a
            href={latest.file.url}
            className="text-lumen hover:text-lumen-strong"
            data-testid={`denoise-download-${runId}`}
            title={`sha256 ${latest.file.sha256}`}
          >
            {latest.file.name} ({(latest.file.bytes / 1e6).toFixed(1)} MB)
          </a>
        ) : (
          <span className={latest.status === 'failed' ? 'text-alarm' : 'text-ink-muted'}>
            {latest.status}
            {latest.stage ? ` · ${latest.stage}` : ''}
            {latest.percent != null && latest.status === 'running' ? ` ${Math.round(latest.percent)} %` : ''}
            {latest.message && latest.status === 'failed' ? ` — ${latest.message}` : ''}
          </span>
        )
      ) : null}
    </div>
  );
}
