'use client';
import Link from 'next/link';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { commandFor, keyBelongsTo } from '@/lib/desk/keys';
import { useDeskPrefs } from '@/lib/desk/prefs';
import type { DeskComponent, DeskRun, OtherVote } from '@/lib/desk/types';
import type { ViewerApi } from '@/components/viewer';
import { MapPanel } from '@/components/desk/map-panel';
import { ChartsPanel } from '@/components/desk/charts-panel';
import { applyViewCommand } from '@/components/desk/view-commands';
import { GoToBox } from '@/components/desk/go-to-box';
import { FeaturePanel } from '@/components/desk/feature-panel';
import { OthersVotes } from '@/components/desk/others-votes';
import { ComponentStrip } from '@/components/desk/component-strip';
import { HelpOverlay } from '@/components/desk/help-overlay';
import { isLowReproducibility } from '@/lib/desk/reproducibility';
import { Notice } from '@/components/ui/notice';
import { StructuralUpload } from '@/components/runs/structural-upload';

type Votes = { assigned: number; submitted: number; votes: OtherVote[] } | null;
const NO_VOTES = new Map();

/**
 * The read-only run view: the rating desk's viewer, plots and features for a study's leads and
 * observers, without voting. Leads also see the votes of raters who have submitted the run.
 */
export function ViewClient({
  run,
  components,
  role,
  votes,
}: {
  run: DeskRun;
  components: DeskComponent[];
  role: 'lead' | 'observer';
  votes: Votes;
}) {
  const [index, setIndex] = useState(0);
  const [prefs, setPrefs] = useDeskPrefs();
  const [help, setHelp] = useState(false);
  const [goToOpen, setGoToOpen] = useState(false);
  const [viewerError, setViewerError] = useState<string | null>(null);
  const viewerApi = useRef<ViewerApi | null>(null);
  const ids = useMemo(() => components.map((c) => c.id), [components]);
  const numbers = useMemo(() => components.map((c) => c.idx), [components]);
  const order = useMemo(() => ids.map((_, i) => i), [ids]);
  const lowIds = useMemo(
    () => new Set(components.filter((c) => isLowReproducibility(c.features, run.reproducibility.threshold)).map((c) => c.id)),
    [components, run.reproducibility.threshold],
  );
  const component = components[index];
  const goTo = useCallback((i: number) => setIndex(i), []);
  const goToNumber = useCallback(
    (n: number) => {
      const i = numbers.indexOf(n);
      if (i < 0) return `Run ${run.runId} has no component ${n}.`;
      setIndex(i);
      return null;
    },
    [numbers, run.runId],
  );

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (keyBelongsTo(e.target)) return;
      const cmd = commandFor(e, []);
      if (!cmd) return;
      if (help && cmd.type !== 'help' && cmd.type !== 'close') return;
      if (cmd.type === 'help') setHelp((h) => !h);
      else if (cmd.type === 'close') setHelp(false);
      else if (
        !applyViewCommand(cmd, {
          setPrefs,
          viewer: viewerApi.current,
          order,
          index,
          goTo,
          openGoTo: () => setGoToOpen(true),
          hasStructural: Boolean(run.structural),
        })
      )
        return;
      e.preventDefault();
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [help, setPrefs, order, index, goTo, run.structural]);

  if (!component) return <Notice kind="info">This run has no components.</Notice>;
  const files = `/api/runs/${run.runId}/view/files`;
  const here = votes?.votes.filter((v) => v.componentId === component.id) ?? [];
  const peak = component.features.peakZ == null ? null : Math.abs(Number(component.features.peakZ));

  return (
    <div className="flex flex-col gap-3" data-testid="run-view" data-role={role}>
      <header className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <div className="min-w-0">
          <h1 className="truncate font-mono text-sm font-semibold" data-testid="run-view-name">
            {run.name}
          </h1>
          <p className="text-xs text-ink-muted">
            <Link href={`/studies/${run.studyId}`} className="hover:text-ink">
              {run.studyName}
            </Link>{' '}
            · read-only{role === 'observer' ? ' (observer)' : ''}: no voting here
          </p>
        </div>
        <p className="font-mono text-sm" data-testid="desk-position" aria-live="polite">
          Component <span className="text-ink">{component.idx}</span> of {run.k}
        </p>
        {votes ? (
          <p className="text-xs text-ink-muted" data-testid="run-view-submitted">
            {votes.submitted} of {votes.assigned} raters submitted
          </p>
        ) : null}
        <button
          type="button"
          onClick={() => setHelp(true)}
          className="ml-auto rounded border border-line-strong px-2 py-1 text-xs text-ink-muted hover:text-ink"
          data-testid="help-button"
        >
          Keys <kbd className="font-mono">?</kbd>
        </button>
      </header>
      {run.warnings.length ? (
        <ul className="text-xs text-alarm">
          {run.warnings.map((w) => (
            <li key={w.code}>{w.message}</li>
          ))}
        </ul>
      ) : null}
      {viewerError ? (
        <Notice kind="error" testId="viewer-error">
          {viewerError}
        </Notice>
      ) : null}
      <ComponentStrip ids={ids} current={index} votes={NO_VOTES} onPick={goTo} numbers={numbers} lowIds={lowIds} />
      {goToOpen ? <GoToBox k={run.k} go={goToNumber} onClose={() => setGoToOpen(false)} /> : null}
      <div className="grid gap-3 lg:grid-cols-[minmax(0,1fr)_20rem]">
        <div className="flex min-w-0 flex-col gap-2">
          <MapPanel
            meanUrl={`${files}/mean.nii.gz?d=${run.decompositionId}`}
            mapsUrl={`/api/runs/${run.runId}/view/maps`}
            mapsVersion={run.decompositionId}
            structuralUrl={run.structural ? `${files}/structural.nii.gz?s=${run.structural.version}` : null}
            frame={component.idx - 1}
            peakZ={peak}
            prefs={prefs}
            setPrefs={setPrefs}
            api={viewerApi}
            onError={setViewerError}
          />
          <ChartsPanel
            run={run}
            series={component}
            showMotion={prefs.showMotion}
            onShowMotion={(on) => setPrefs((p) => ({ ...p, showMotion: on }))}
          />
        </div>
        <aside className="flex flex-col gap-3" aria-label="Votes and features">
          {votes ? (
            votes.submitted ? (
              <OthersVotes votes={here} title="Submitted votes" />
            ) : (
              <p className="rounded border border-line bg-ground-raised p-3 text-xs text-ink-muted" data-testid="votes-blinded">
                No rater has submitted this run yet; votes appear here once a rater submits.
              </p>
            )
          ) : null}
          <FeaturePanel component={component} k={run.k} reproducibilityThreshold={run.reproducibility.threshold} />
          {role === 'lead' ? <StructuralUpload runId={run.runId} current={run.structural?.name ?? null} /> : null}
        </aside>
      </div>
      {help ? <HelpOverlay labelSet={[]} noiseKinds={[]} onClose={() => setHelp(false)} readOnly /> : null}
    </div>
  );
}
