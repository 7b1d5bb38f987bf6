'use client';

import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { Panel } from '@/components/ui/panel';
import { formatStat } from '@/components/agreement/format';
import { ThresholdForm } from './threshold-form';
import { RoundHistory } from './round-history';
import {
  useCalibration,
  useCalibrationAction,
  type CalibrationRaterView,
  type CalibrationRunView,
  type CalibrationView,
} from './use-calibration';

const input = 'rounded border border-line-strong bg-ground-sunken px-2 py-1 text-xs text-ink';

function referenceState(run: CalibrationRunView): { text: string; tone: string } {
  if (run.total > 0 && run.referenced === run.total) return { text: `reference complete (${run.total})`, tone: 'text-lumen-strong' };
  if (run.pending > 0) return { text: `${run.referenced}/${run.total} referenced · ${run.pending} decisions pending`, tone: 'text-alarm' };
  return { text: `${run.referenced}/${run.total} referenced`, tone: 'text-ink-muted' };
}

/** One calibration run: reference status, adopt references, its raters' progress, assign a rater. */
function RunRow({
  run,
  raters,
  busy,
  act,
}: {
  run: CalibrationRunView;
  raters: CalibrationRaterView[];
  busy: boolean;
  act: (path: string, body: unknown, done: string, method?: 'POST' | 'DELETE') => void;
}) {
  const state = referenceState(run);
  const complete = run.total > 0 && run.referenced === run.total;
  const free = raters.filter((r) => r.active && !run.assignments.some((a) => a.raterId === r.id));
  return (
    <tr className="border-t border-line align-top" data-testid={`calibration-run-${run.runId}`}>
      <td className="py-2 pr-3 font-medium">
        {run.runName}
        <div className="mt-1">
          <Button
            variant="quiet"
            className="text-xs"
            disabled={busy}
            onClick={() =>
              act(
                `/runs/${run.runId}`,
                null,
                `${run.runName} is no longer a calibration run; its references, votes and the scores up to now are kept.`,
                'DELETE',
              )
            }
            data-testid="calibration-unmark"
          >
            Unmark
          </Button>
        </div>
      </td>
      <td className="py-2 pr-3">
        <span className={`text-xs ${state.tone}`} data-testid="calibration-reference-state">
          {state.text}
        </span>
        <div className="mt-1">
          <Button
            variant="quiet"
            className="text-xs"
            disabled={busy}
            onClick={() => act(`/runs/${run.runId}/references`, { adopt: true }, `${run.runName}: decisions adopted as reference.`)}
            data-testid="calibration-adopt"
          >
            {run.referenced ? 'Adopt decisions again' : 'Adopt decisions as reference'}
          </Button>
        </div>
      </td>
      <td className="py-2 pr-3">
        <ul className="flex flex-col gap-1">
          {run.assignments.map((a) => (
            <li key={a.raterId} className="text-xs" data-testid={`calibration-assignment-${run.runId}-${a.raterId}`}>
              <span className="font-medium text-ink">{a.raterName}</span>{' '}
              <span className="tabular-nums text-ink-muted">
                {a.labelled}/{run.total} labelled
              </span>{' '}
              <span className={a.submittedAt ? 'text-lumen-strong' : 'text-ink-faint'}>{a.submittedAt ? 'submitted' : 'open'}</span>
            </li>
          ))}
          {run.assignments.length === 0 ? <li className="text-xs text-ink-faint">nobody assigned</li> : null}
        </ul>
        {complete && free.length ? (
          <select
            className={`${input} mt-1`}
            aria-label={`Assign a rater to ${run.runName}`}
            value=""
            disabled={busy}
            onChange={(e) => {
              const r = free.find((x) => x.id === Number(e.target.value));
              if (r) act(`/runs/${run.runId}/raters`, { raterId: r.id }, `${r.name} assigned to ${run.runName}.`);
            }}
            data-testid="calibration-assign"
          >
            <option value="">assign a rater…</option>
            {free.map((r) => (
              <option key={r.id} value={r.id}>
                {r.name}
              </option>
            ))}
          </select>
        ) : null}
      </td>
    </tr>
  );
}

/** The lead's calibration set: calibration runs with their reference status and raters, raters' scores and certification. */
export function CalibrationClient({ studyId, initial }: { studyId: number; initial: CalibrationView }) {
  const { data } = useCalibration(studyId, initial);
  const action = useCalibrationAction(studyId);
  const [message, setMessage] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [candidate, setCandidate] = useState('');
  const act = (path: string, body: unknown, done: string, method: 'POST' | 'DELETE' = 'POST') => {
    setMessage(null);
    action.mutate(
      { path, body, method },
      { onSuccess: () => setMessage({ kind: 'ok', text: done }), onError: (e) => setMessage({ kind: 'error', text: e.message }) },
    );
  };
  const busy = action.isPending;

  return (
    <div className="flex flex-col gap-6">
      {message ? (
        <Notice kind={message.kind} testId="calibration-message">
          {message.text}
        </Notice>
      ) : null}
      <Panel
        title="Calibration runs"
        actions={
          <form
            className="flex items-center gap-2"
            onSubmit={(e) => {
              e.preventDefault();
              const c = data.candidates.find((x) => x.runId === Number(candidate));
              if (c) act('/runs', { runId: c.runId }, `${c.runName} is now a calibration run.`);
              setCandidate('');
            }}
          >
            <select
              className={input}
              aria-label="A ready run to mark as a calibration run"
              value={candidate}
              onChange={(e) => setCandidate(e.target.value)}
              disabled={busy || !data.candidates.length}
              data-testid="calibration-candidate"
            >
              <option value="">{data.candidates.length ? 'choose a ready run…' : 'no ready runs'}</option>
              {data.candidates.map((c) => (
                <option key={c.runId} value={c.runId}>
                  {c.runName}
                </option>
              ))}
            </select>
            <Button type="submit" variant="quiet" className="text-xs" disabled={busy || !candidate} data-testid="calibration-mark">
              Mark as calibration run
            </Button>
          </form>
        }
      >
        {data.runs.length ? (
          <table className="w-full text-sm">
            <thead className="text-left text-xs text-ink-faint">
              <tr>
                <th className="pb-1 pr-3 font-medium">Run</th>
                <th className="pb-1 pr-3 font-medium">Reference labels</th>
                <th className="pb-1 pr-3 font-medium">Raters</th>
              </tr>
            </thead>
            <tbody>
              {data.runs.map((r) => (
                <RunRow key={r.runId} run={r} raters={data.raters} busy={busy} act={act} />
              ))}
            </tbody>
          </table>
        ) : (
          <p className="text-sm text-ink-muted">No calibration runs yet. Choose a ready run whose decisions you trust and mark it.</p>
        )}
      </Panel>

      <Panel title="Raters">
        <div className="mb-3">
          <ThresholdForm
            studyId={studyId}
            threshold={data.threshold ?? { minAc1: null, minSensitivity: null }}
            recalibrationWeeks={data.recalibrationWeeks ?? null}
          />
        </div>
        {data.raters.length ? (
          <table className="w-full text-sm">
            <thead className="text-left text-xs text-ink-faint">
              <tr>
                <th className="pb-1 pr-3 font-medium">Rater</th>
                <th className="pb-1 pr-3 font-medium">Runs</th>
                <th className="pb-1 pr-3 text-right font-medium">Components</th>
                <th className="pb-1 pr-3 text-right font-medium">Percent</th>
                <th className="pb-1 pr-3 text-right font-medium">Cohen&apos;s κ</th>
                <th className="pb-1 pr-3 text-right font-medium">Gwet&apos;s AC1</th>
                <th className="pb-1 pr-3 text-right font-medium">Noise sens.</th>
                <th className="pb-1 pr-3 text-right font-medium">Noise spec.</th>
                <th className="pb-1 pr-3 font-medium">Live runs</th>
                <th className="pb-1 pr-3 font-medium">Certification</th>
              </tr>
            </thead>
            <tbody>
              {data.raters.map((r) => {
                const s = r.score;
                const cell = (v: CalibrationRaterView['score']['cohenKappa']) => (
                  <td className="py-2 pr-3 text-right tabular-nums" title={v.reason}>
                    {formatStat(v)}
                  </td>
                );
                return (
                  <tr key={r.id} className="border-t border-line" data-testid={`calibration-rater-${r.id}`}>
                    <td className="py-2 pr-3 font-medium">
                      {r.name}
                      {r.active ? '' : ' (deactivated)'}
                    </td>
                    <td className="py-2 pr-3 tabular-nums text-ink-muted">{r.submittedRuns} submitted</td>
                    <td className="py-2 pr-3 text-right tabular-nums">{s.n}</td>
                    {cell(s.percentAgreement)}
                    {cell(s.cohenKappa)}
                    {cell(s.gwetAC1)}
                    {cell(s.noise.sensitivity)}
                    {cell(s.noise.specificity)}
                    <td className="py-2 pr-3 text-xs" data-testid="calibration-gate">
                      {!r.gate?.gated ? (
                        <span className="text-ink-faint">no threshold</span>
                      ) : r.gate.passes ? (
                        <span className="text-lumen-strong">eligible</span>
                      ) : (
                        <span className="text-alarm">not yet: {r.gate.reason}</span>
                      )}
                      {r.history && r.history.length > 1 ? (
                        <span className="block text-ink-faint" data-testid="calibration-history">
                          over time (AC1 / noise sens.):{' '}
                          {r.history
                            .map(
                              (h) =>
                                `${h.submittedAt.slice(0, 10)} ${formatStat(h.score.gwetAC1, 2)} / ${formatStat(h.score.noise.sensitivity, 2)}${h.stillCalibration ? '' : ' (unmarked)'}`,
                            )
                            .join(' → ')}
                        </span>
                      ) : null}
                      {r.rounds?.length ? (
                        <RoundHistory
                          rounds={r.rounds}
                          raterId={r.id}
                          minAc1={data.threshold?.minAc1 ?? null}
                          minSensitivity={data.threshold?.minSensitivity ?? null}
                        />
                      ) : null}
                      {r.byKind?.length ? (
                        <span className="block text-ink-faint" data-testid="calibration-by-kind">
                          by kind: {r.byKind.map((k) => `${k.kind} ${k.detected}/${k.n}`).join(', ')}
                        </span>
                      ) : null}
                    </td>
                    <td className="py-2 pr-3">
                      <div className="flex flex-wrap items-center gap-2">
                        <span
                          className={`text-xs ${r.certification?.passed ? 'text-lumen-strong' : r.certification ? 'text-alarm' : 'text-ink-faint'}`}
                          data-testid="calibration-certification"
                        >
                          {r.certification
                            ? `${r.certification.passed ? 'certified' : 'not passed'}${r.certification.certifiedAt ? ` ${r.certification.certifiedAt.slice(0, 10)}` : ''}`
                            : 'not certified'}
                        </span>
                        <Button
                          variant="quiet"
                          className="text-xs"
                          disabled={busy || s.n === 0}
                          onClick={() => act('/certifications', { userId: r.id, passed: true }, `${r.name} is certified.`)}
                          data-testid="calibration-certify"
                        >
                          Certify
                        </Button>
                        <Button
                          variant="danger"
                          className="text-xs"
                          disabled={busy}
                          onClick={() => act('/certifications', { userId: r.id, passed: false }, `${r.name} is recorded as not passed.`)}
                          data-testid="calibration-fail"
                        >
                          Not passed
                        </Button>
                      </div>
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        ) : (
          <p className="text-sm text-ink-muted">This study has no raters yet. Add them under Protocol and members.</p>
        )}
        <p className="mt-3 text-xs text-ink-faint">
          Scores pool the rater&apos;s submitted calibration runs against the reference labels; for noise detection, &apos;uncertain&apos;
          counts as not noise. Once any rater of the study has a certification row, automatic assignment gives live runs to certified raters
          first.
        </p>
      </Panel>
    </div>
  );
}
