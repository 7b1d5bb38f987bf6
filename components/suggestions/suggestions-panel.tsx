'use client';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { getJson, patchJson, postJson } from '@/lib/api/client';
import type { StudySuggestionsPayload } from '@/lib/suggestions/types';
import type { StatResult } from '@/lib/agreement/result';
import { Button } from '@/components/ui/button';
import { Panel } from '@/components/ui/panel';
import { CalibrationPlot } from './calibration-plot';

export type RaterComparison = { name: string; kappa: StatResult; sensitivity: StatResult; specificity: StatResult };

const f2 = (s: StatResult | null | undefined) => (s?.value == null ? '—' : s.value.toFixed(2));

/**
 * The agreement page's suggestion panel: the model in use, its subject-wise cross-validated
 * agreement with the decisions beside each rater's own, a calibration plot and the features that
 * matter most; for leads, training from released decisions and the switch that shows suggestions
 * to raters (after their own vote).
 */
export function SuggestionsPanel({ studyId, canManage, raters }: { studyId: number; canManage: boolean; raters: RaterComparison[] }) {
  const qc = useQueryClient();
  const key = ['suggestions', studyId];
  const q = useQuery({
    queryKey: key,
    queryFn: async () => {
      const r = await getJson<StudySuggestionsPayload>(`/api/studies/${studyId}/suggestions`);
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
    refetchInterval: (s) => (s.state.data?.training && ['queued', 'running'].includes(s.state.data.training.status) ? 2000 : false),
  });
  const train = useMutation({
    mutationFn: async () => {
      const r = await postJson<{ jobId: number }>(`/api/studies/${studyId}/suggestions/train`, {});
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: key }),
  });
  const toggle = useMutation({
    mutationFn: async (enabled: boolean) => {
      const r = await patchJson<{ enabled: boolean }>(`/api/studies/${studyId}/suggestions`, { enabled });
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: key }),
  });
  const d = q.data;
  const m = d?.model;
  const job = d?.training;
  const busy = job && ['queued', 'running'].includes(job.status);
  const rep = m?.report;
  return (
    <Panel title="Learned suggestions" className="lg:col-span-2">
      <div className="flex flex-col gap-4 text-sm" data-testid="suggestions-panel">
        {q.error ? <p className="text-alarm">{q.error.message}</p> : null}
        {canManage ? (
          <div className="flex flex-wrap items-center gap-3">
            <Button variant="quiet" onClick={() => train.mutate()} disabled={!!busy || train.isPending} data-testid="suggestions-train">
              {m ? 'Train again from released decisions' : 'Train from released decisions'}
            </Button>
            <label className="flex items-center gap-2">
              <input
                type="checkbox"
                checked={!!d?.enabled}
                disabled={!m || toggle.isPending}
                onChange={(e) => toggle.mutate(e.target.checked)}
                data-testid="suggestions-enabled"
              />
              Show suggestions to raters, each only after their own vote
            </label>
            {train.error ? <span className="text-alarm">{train.error.message}</span> : null}
            {toggle.error ? <span className="text-alarm">{toggle.error.message}</span> : null}
          </div>
        ) : null}
        {job ? (
          <p className="text-ink-muted" data-testid="suggestions-job">
            Training: {job.status}
            {busy ? ` — ${job.stage ?? 'waiting for the worker'}${job.percent != null ? ` ${Math.round(job.percent)} %` : ''}` : ''}
            {job.status === 'failed' && job.message ? ` — ${job.message}` : ''}
          </p>
        ) : null}
        {!m || !rep ? (
          <p className="text-ink-muted" data-testid="suggestions-none">
            No model yet: a lead trains one from released decisions.
          </p>
        ) : (
          <>
            <p data-testid="suggestions-model">
              Model version {m.version}: {rep.chosen}, chosen by {rep.folds}-fold cross-validation with folds by subject ({rep.subjects}{' '}
              subjects, {rep.n} components, {rep.noise} noise) from {m.training.releases.length} release
              {m.training.releases.length === 1 ? '' : 's'}
              {m.training.skipped ? `; ${m.training.skipped} decisions neither signal nor noise left out` : ''}. Operating point: noise when
              P(noise) ≥ {rep.threshold}.{' '}
              <a className="text-lumen hover:text-lumen-strong" href={`/api/studies/${studyId}/suggestions/model`}>
                Model as JSON
              </a>
            </p>
            <div className="grid gap-4 lg:grid-cols-3">
              <table className="w-full" data-testid="suggestions-vs-raters">
                <thead className="text-xs text-ink-faint">
                  <tr>
                    <th className="text-left font-medium">Against the decisions</th>
                    <th className="font-medium">κ</th>
                    <th className="font-medium">noise sens.</th>
                    <th className="font-medium">spec.</th>
                  </tr>
                </thead>
                <tbody className="font-mono">
                  <tr className="text-lumen" data-testid="suggestions-model-row">
                    <td className="font-sans">Model (out of fold)</td>
                    <td className="text-center">{f2(rep.score.cohenKappa)}</td>
                    <td className="text-center">{f2(rep.score.noise.sensitivity)}</td>
                    <td className="text-center">{f2(rep.score.noise.specificity)}</td>
                  </tr>
                  {raters.map((r) => (
                    <tr key={r.name}>
                      <td className="font-sans">{r.name}</td>
                      <td className="text-center">{f2(r.kappa)}</td>
                      <td className="text-center">{f2(r.sensitivity)}</td>
                      <td className="text-center">{f2(r.specificity)}</td>
                    </tr>
                  ))}
                </tbody>
                <tfoot className="text-xs text-ink-muted">
                  <tr>
                    <td colSpan={4} className="pt-2">
                      Model: accuracy {f2(rep.score.percentAgreement)}, AC1 {f2(rep.score.gwetAC1)}. Raters are scored on this study’s
                      decisions, the model on the released decisions it was cross-validated on.
                    </td>
                  </tr>
                </tfoot>
              </table>
              <div>
                <CalibrationPlot bins={rep.calibration} />
              </div>
              <div>
                <p className="mb-1 text-xs text-ink-faint">Features that matter most</p>
                <ol className="list-decimal pl-5" data-testid="suggestions-importance">
                  {rep.importance.slice(0, 6).map((f) => (
                    <li key={f.feature}>
                      {f.feature} <span className="font-mono text-ink-muted">{f.weight.toFixed(2)}</span>
                    </li>
                  ))}
                </ol>
                <p className="mt-2 text-xs text-ink-faint">Undefined features: the training median, with a “:missing” column.</p>
              </div>
            </div>
          </>
        )}
      </div>
    </Panel>
  );
}
