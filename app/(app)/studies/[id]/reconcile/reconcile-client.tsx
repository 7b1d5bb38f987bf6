'use client';
import Link from 'next/link';
import { useMemo, useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { postJson } from '@/lib/api/client';
import { bidsName } from '@/lib/bids';
import { labelName, noiseKindName } from '@/lib/vocabulary/protocol';
import type { ReconcileItem } from '@/lib/db/queries/reconcile';
import type { ViewerApi } from '@/components/viewer';
import { MapPanel } from '@/components/desk/map-panel';
import { useDeskPrefs } from '@/lib/desk/prefs';
import { TimecourseChart } from '@/components/charts/timecourse-chart';
import { SpectrumChart } from '@/components/charts/spectrum-chart';
import { FeaturePanel } from '@/components/desk/feature-panel';
import { VotesSideBySide } from '@/components/reconcile/votes-side-by-side';
import { useReconcileItems, useReconcileRun } from '@/components/reconcile/use-reconcile';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { modelDisagreement, sortByDisagreement } from '@/lib/suggestions/disagreement';

const METHOD_NAMES: Record<string, string> = {
  pending: 'waiting for a lead',
  unanimous: 'unanimous',
  majority: 'majority',
  reconciled: 'decided by a lead',
  override: 'overridden by a lead',
};

export function ReconcileClient({
  studyId,
  studyName,
  initialItems,
}: {
  studyId: number;
  studyName: string;
  initialItems: ReconcileItem[];
}) {
  const queryClient = useQueryClient();
  const [include, setInclude] = useState<'pending' | 'all'>('pending');
  const [prefs, setPrefs] = useDeskPrefs();
  const viewerApi = useRef<ViewerApi | null>(null);
  const [runFilter, setRunFilter] = useState<number | undefined>();
  const [kindFilter, setKindFilter] = useState<string | undefined>();
  const [order, setOrder] = useState<'run' | 'disagreement'>('run');
  const { data: fetched = [], isFetching } = useReconcileItems(studyId, { runId: runFilter, noiseKind: kindFilter, include }, initialItems);
  const items = useMemo(() => (order === 'disagreement' ? sortByDisagreement(fetched) : fetched), [fetched, order]);
  const scored = fetched.some((i) => i.suggestion);
  const [selected, setSelected] = useState<number | null>(initialItems[0]?.componentId ?? null);
  const item = items.find((i) => i.componentId === selected) ?? items[0] ?? null;
  const runView = useReconcileRun(item?.runId ?? null);
  const component = runView.data?.components.find((c) => c.id === item?.componentId) ?? null;
  const run = runView.data?.run;

  const [label, setLabel] = useState<string>(item?.decision.label ?? '');
  const [noiseKind, setNoiseKind] = useState<string>(item?.decision.noiseKind ?? '');
  const [reason, setReason] = useState('');
  const [failure, setFailure] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const [done, setDone] = useState<string | null>(null);

  // the form follows the selected item: reset it while rendering when the item (or its decision) changes
  const itemKey = `${item?.componentId}|${item?.decision.label}|${item?.decision.noiseKind}`;
  const [formKey, setFormKey] = useState(itemKey);
  if (formKey !== itemKey) {
    setFormKey(itemKey);
    setLabel(item?.decision.label ?? '');
    setNoiseKind(item?.decision.noiseKind ?? '');
    setReason('');
    setFailure(null);
  }

  const runs = useMemo(() => {
    const m = new Map<number, string>();
    for (const i of initialItems) m.set(i.runId, bidsName(i.run));
    for (const i of items) m.set(i.runId, bidsName(i.run));
    return [...m.entries()];
  }, [initialItems, items]);
  const labels = run?.labelSet ?? ['signal', 'noise', 'uncertain'];
  const kinds = run?.noiseKinds ?? [];

  async function decide() {
    if (!item) return;
    setSaving(true);
    setFailure(null);
    const result = await postJson<{ decision: { method: string } }>(`/api/studies/${studyId}/decisions`, {
      componentId: item.componentId,
      label,
      noiseKind: label === 'noise' ? noiseKind || null : null,
      reason,
      baseVersion: item.decision.version,
    });
    setSaving(false);
    if (!result.ok) {
      setFailure(result.fields ? Object.values(result.fields).flat().join(' ') : result.message);
      // another lead decided first: show their decision (the message says what to do)
      if (result.status === 409) await queryClient.invalidateQueries({ queryKey: ['reconcile', studyId] });
      return;
    }
    setDone(`Component ${item.idx} of ${bidsName(item.run)}: ${labelName(label)} (${METHOD_NAMES[result.data.decision.method]}).`);
    const next = items[items.indexOf(item) + 1] ?? null;
    setSelected(next?.componentId ?? null);
    await queryClient.invalidateQueries({ queryKey: ['reconcile', studyId] });
  }

  return (
    <div className="flex flex-col gap-4">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-sm text-ink-muted">
            <Link href={`/studies/${studyId}`} className="hover:text-ink">
              {studyName}
            </Link>
          </p>
          <h1 className="text-xl font-semibold" data-testid="reconcile-heading">
            Reconcile
          </h1>
        </div>
        <div className="flex flex-wrap gap-2 text-sm">
          <label className="flex items-center gap-1 text-ink-muted">
            Run
            <select
              className="rounded border border-line-strong bg-ground-sunken px-2 py-1 text-ink"
              value={runFilter ?? ''}
              onChange={(e) => setRunFilter(e.target.value ? Number(e.target.value) : undefined)}
            >
              <option value="">all runs</option>
              {runs.map(([id, name]) => (
                <option key={id} value={id}>
                  {name}
                </option>
              ))}
            </select>
          </label>
          <label className="flex items-center gap-1 text-ink-muted">
            A rater said
            <select
              className="rounded border border-line-strong bg-ground-sunken px-2 py-1 text-ink"
              value={kindFilter ?? ''}
              onChange={(e) => setKindFilter(e.target.value || undefined)}
            >
              <option value="">any noise kind</option>
              {(kinds.length
                ? kinds
                : ['motion', 'pulsation', 'vascular', 'csf', 'white-matter', 'susceptibility', 'scanner', 'other']
              ).map((k) => (
                <option key={k} value={k}>
                  {noiseKindName(k)}
                </option>
              ))}
            </select>
          </label>
          <label className="flex items-center gap-1 text-ink-muted">
            Order
            <select
              className="rounded border border-line-strong bg-ground-sunken px-2 py-1 text-ink"
              value={order}
              onChange={(e) => setOrder(e.target.value as 'run' | 'disagreement')}
              data-testid="reconcile-order"
            >
              <option value="run">by run and component</option>
              <option value="disagreement" disabled={!scored}>
                by the model’s disagreement with the votes{scored ? '' : ' (no suggestions yet)'}
              </option>
            </select>
          </label>
          <label className="flex items-center gap-1 text-ink-muted">
            <input type="checkbox" checked={include === 'all'} onChange={(e) => setInclude(e.target.checked ? 'all' : 'pending')} />
            also decided components (to override)
          </label>
        </div>
      </header>

      {done ? <Notice kind="ok">{done}</Notice> : null}

      {items.length === 0 ? (
        <Notice testId="reconcile-empty">
          {isFetching
            ? 'Loading…'
            : 'Nothing waits for a decision. Components appear here once every assigned rater has submitted a run and their votes disagree.'}
        </Notice>
      ) : (
        <div className="grid gap-4 lg:grid-cols-[15rem_1fr_22rem]">
          <nav
            aria-label="Components waiting for a decision"
            className="max-h-[70vh] overflow-y-auto rounded border border-line bg-ground-raised"
          >
            <ul className="divide-y divide-line text-sm" data-testid="reconcile-list">
              {items.map((i) => (
                <li key={i.componentId}>
                  <button
                    type="button"
                    onClick={() => setSelected(i.componentId)}
                    aria-current={i.componentId === item?.componentId ? 'true' : undefined}
                    className={`w-full px-3 py-2 text-left hover:bg-ground ${i.componentId === item?.componentId ? 'bg-ground text-lumen-strong' : ''}`}
                  >
                    <span className="block font-mono text-xs text-ink-muted">{bidsName(i.run)}</span>
                    component {i.idx} of {i.k} ·{' '}
                    <span className="text-ink-muted">{i.votes.map((v) => labelName(v.label)).join(' / ')}</span>
                    {order === 'disagreement' && i.suggestion ? (
                      <span className="block text-xs text-ink-faint" data-testid="reconcile-disagreement">
                        model {labelName(i.suggestion.label)} (P(noise) {i.suggestion.pNoise.toFixed(2)}), disagreement{' '}
                        {modelDisagreement(i.suggestion.pNoise, i.votes)?.toFixed(2) ?? '—'}
                      </span>
                    ) : null}
                  </button>
                </li>
              ))}
            </ul>
          </nav>

          <section className="flex min-w-0 flex-col gap-3" aria-label="The component">
            {item && run && component ? (
              <>
                {/* the desk's map panel with the desk's view settings: same layout, mosaic arrangement, threshold and colour bar */}
                <MapPanel
                  meanUrl={`/api/reconcile/runs/${run.runId}/files/mean.nii.gz?d=${run.decompositionId}`}
                  mapsUrl={`/api/reconcile/runs/${run.runId}/maps`}
                  mapsVersion={run.decompositionId}
                  structuralUrl={
                    run.structural ? `/api/reconcile/runs/${run.runId}/files/structural.nii.gz?s=${run.structural.version}` : null
                  }
                  frame={component.idx - 1}
                  peakZ={component.features.peakZ == null ? null : Math.abs(Number(component.features.peakZ))}
                  prefs={prefs}
                  setPrefs={setPrefs}
                  api={viewerApi}
                />
                <figure className="rounded border border-line bg-ground-raised p-2">
                  <figcaption className="text-xs text-ink-muted">Time course (s)</figcaption>
                  <TimecourseChart values={component.timecourse} trSeconds={run.trSeconds} droppedVolumes={run.droppedVolumes} />
                </figure>
                <figure className="rounded border border-line bg-ground-raised p-2">
                  <figcaption className="text-xs text-ink-muted">Power spectrum (Hz)</figcaption>
                  <SpectrumChart frequencies={component.frequencies} power={component.spectrum} trSeconds={run.trSeconds} />
                </figure>
              </>
            ) : (
              <div className="h-[380px] animate-pulse rounded bg-ground-raised" aria-label="Loading the component" />
            )}
          </section>

          <aside className="flex flex-col gap-3">
            {item ? (
              <>
                <section className="rounded border border-line bg-ground-raised p-3">
                  <h2 className="mb-2 text-xs font-semibold uppercase tracking-wider text-ink-muted">
                    Votes · {METHOD_NAMES[item.decision.method] ?? item.decision.method}
                  </h2>
                  <VotesSideBySide votes={item.votes} />
                  {item.decision.reason ? <p className="mt-2 text-xs text-ink-muted">Earlier reason: {item.decision.reason}</p> : null}
                </section>
                <form
                  className="flex flex-col gap-2 rounded border border-line bg-ground-raised p-3"
                  data-testid="decision-form"
                  onSubmit={(e) => {
                    e.preventDefault();
                    void decide();
                  }}
                >
                  <h2 className="text-xs font-semibold uppercase tracking-wider text-ink-muted">Your decision</h2>
                  <div className="flex gap-2" role="radiogroup" aria-label="Final label">
                    {labels.map((l) => (
                      <button
                        key={l}
                        type="button"
                        role="radio"
                        aria-checked={label === l}
                        data-testid={`decide-${l}`}
                        onClick={() => setLabel(l)}
                        className={`flex-1 rounded border px-2 py-1.5 text-sm ${label === l ? 'border-lumen bg-lumen/15 text-ink' : 'border-line-strong text-ink-muted hover:text-ink'}`}
                      >
                        {labelName(l)}
                      </button>
                    ))}
                  </div>
                  {label === 'noise' ? (
                    <label className="flex flex-col gap-1 text-sm text-ink-muted">
                      Noise kind
                      <select
                        className="rounded border border-line-strong bg-ground-sunken px-2 py-1 text-ink"
                        value={noiseKind}
                        onChange={(e) => setNoiseKind(e.target.value)}
                        data-testid="decide-kind"
                      >
                        <option value="">not stated</option>
                        {kinds.map((k) => (
                          <option key={k} value={k}>
                            {noiseKindName(k)}
                          </option>
                        ))}
                      </select>
                    </label>
                  ) : null}
                  <label htmlFor="decision-reason" className="text-sm text-ink-muted">
                    Reason (required; kept in the audit log and the export)
                  </label>
                  <textarea
                    id="decision-reason"
                    data-testid="decide-reason"
                    value={reason}
                    onChange={(e) => setReason(e.target.value)}
                    rows={3}
                    aria-describedby={failure ? 'decision-error' : undefined}
                    className="rounded border border-line-strong bg-ground-sunken px-2 py-1 text-sm text-ink"
                  />
                  {failure ? (
                    <p id="decision-error" role="alert" className="text-xs text-alarm" data-testid="decision-error">
                      {failure}
                    </p>
                  ) : null}
                  <Button type="submit" disabled={!label || saving} data-testid="decide-submit">
                    {saving ? 'Saving…' : 'Record decision'}
                  </Button>
                </form>
                {component ? (
                  <FeaturePanel component={component} k={item.k} reproducibilityThreshold={run?.reproducibility?.threshold} />
                ) : null}
              </>
            ) : null}
          </aside>
        </div>
      )}
    </div>
  );
}
