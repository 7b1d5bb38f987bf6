'use client';
import Link from 'next/link';
import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { postJson } from '@/lib/api/client';
import { commandFor, keyBelongsTo } from '@/lib/desk/keys';
import { useDeskSeries } from '@/lib/desk/use-desk-series';
import { useVotes, votesKey } from '@/lib/desk/use-vote';
import { useDeskPosition } from '@/lib/desk/use-desk-position';
import type { DeskPagePayload, VoteFields, VotesPayload } from '@/lib/desk/types';
import type { ViewerApi } from '@/components/viewer';
import { useDeskPrefs } from '@/lib/desk/prefs';
import { useFlags } from '@/lib/desk/use-flags';
import { MapPanel } from '@/components/desk/map-panel';
import { ChartsPanel } from '@/components/desk/charts-panel';
import { applyViewCommand } from '@/components/desk/view-commands';
import { GoToBox } from '@/components/desk/go-to-box';
import { FeaturePanel } from '@/components/desk/feature-panel';
import { SuggestionAfterVote } from '@/components/suggestions/suggestion-after-vote';
import { isLowReproducibility } from '@/lib/desk/reproducibility';
import { HelpOverlay } from '@/components/desk/help-overlay';
import { ComponentStrip, visibleIndices, type StripFilter } from '@/components/desk/component-strip';
import { VerdictPanel } from '@/components/desk/verdict-panel';
import { OthersVotes } from '@/components/desk/others-votes';
import { Notice } from '@/components/ui/notice';
import { markSwitch, measureSwitch } from '@/lib/desk/switch-timing';
import { deskStartIndex } from '@/lib/desk/start-index';

export function RateClient({
  runId,
  userId,
  initialComponents,
  initialVotes,
}: {
  runId: number;
  userId: number;
  initialComponents: DeskPagePayload;
  initialVotes: VotesPayload;
}) {
  const queryClient = useQueryClient();
  const { run, components, shown } = initialComponents;
  const { seriesOf, error: seriesError } = useDeskSeries(runId, run.decompositionId, shown);
  const { votes, status, others, setVote, sync, clearRefusal } = useVotes({ runId, userId, initialData: initialVotes });

  const ids = useMemo(() => components.map((c) => c.id), [components]);
  const numbers = useMemo(() => components.map((c) => c.idx), [components]);
  const lowIds = useMemo(() => {
    const threshold = run.reproducibility?.threshold;
    return new Set(threshold === undefined ? [] : components.filter((c) => isLowReproducibility(c.features, threshold)).map((c) => c.id));
  }, [components, run.reproducibility?.threshold]);
  const firstUnlabelled = useCallback(
    (from = 0) => {
      for (let i = 0; i < ids.length; i++) {
        const j = (from + i) % ids.length;
        if (!votes.get(ids[j])?.label) return j;
      }
      return -1;
    },
    [ids, votes],
  );
  const [index, setIndex] = useState(() => deskStartIndex(run.lastComponentIdx, components, initialVotes.mine));
  const [prefs, setPrefs] = useDeskPrefs();
  const { flags, toggle: toggleFlag } = useFlags(runId, userId);
  const [filter, setFilter] = useState<StripFilter>('all');
  const [goToOpen, setGoToOpen] = useState(false);
  const viewerApi = useRef<ViewerApi | null>(null);
  const [help, setHelp] = useState(false);
  const [viewerError, setViewerError] = useState<string | null>(null);
  const [submitState, setSubmitState] = useState<{ busy: boolean; message: string | null }>({ busy: false, message: null });
  const noteRef = useRef<HTMLTextAreaElement>(null);
  const navStart = useRef<{ frame: number } | null>(null);

  const component = components[index];
  const vote = votes.get(component.id);
  const labelledCount = ids.filter((id) => votes.get(id)?.label).length;
  const released = Boolean(status?.released);
  const submitted = Boolean(status?.submittedAt);
  // a submitted rater's votes are frozen until a lead reopens the run for them (blinding)
  const frozen = released || submitted;

  // remember where the rater is (reopens here, also after a reload that outran the server)
  const { remember, pendingIdx } = useDeskPosition(runId, userId, components.length);
  useEffect(() => {
    const pending = pendingIdx();
    // eslint-disable-next-line react-hooks/set-state-in-effect -- the stored position is in localStorage, readable only after hydration
    if (pending !== null) setIndex(pending - 1);
  }, [pendingIdx]);

  const goTo = useCallback(
    (next: number) => {
      if (next < 0 || next >= ids.length) return;
      markSwitch();
      navStart.current = { frame: components[next]!.idx - 1 };
      remember(next + 1);
      setIndex(next);
    },
    [ids.length, components, remember],
  );

  const onDrawn = useCallback((frame: number, phase: 'issued' | 'painted') => {
    const start = navStart.current;
    if (!start || start.frame !== frame) return;
    if (phase === 'painted') navStart.current = null;
    measureSwitch(phase);
  }, []);

  // React has committed the new component (children's layout effects run before this one)
  useLayoutEffect(() => {
    if (navStart.current?.frame === component.idx - 1) measureSwitch('committed');
  }, [component.idx]);

  const order = useMemo(() => visibleIndices(ids, filter, votes, flags, index), [ids, filter, votes, flags, index]);
  const goToNumber = useCallback(
    (n: number): string | null => {
      const i = numbers.indexOf(n);
      if (i < 0) return `Component ${n} is hidden from raters in this study (low reproducibility).`;
      goTo(i);
      return null;
    },
    [numbers, goTo],
  );

  const change = useCallback(
    (fields: Partial<VoteFields>, advance = false) => {
      if (frozen) return;
      setVote(component.id, fields);
      if (advance && prefs.autoAdvance && index < ids.length - 1) goTo(index + 1);
    },
    [frozen, setVote, component.id, prefs.autoAdvance, index, ids.length, goTo],
  );

  const submit = useCallback(async () => {
    if (submitted || submitState.busy) return;
    if (labelledCount < ids.length) {
      setSubmitState({
        busy: false,
        message: `${ids.length - labelledCount} components are not labelled yet. Enter jumps to the next one.`,
      });
      return;
    }
    if (sync.unsaved > 0) {
      setSubmitState({ busy: false, message: 'Some votes are not saved yet; submit again once they are.' });
      return;
    }
    setSubmitState({ busy: true, message: null });
    const res = await postJson<{ submittedAt: string }>(`/api/runs/${runId}/submit`, {});
    setSubmitState({ busy: false, message: res.ok ? null : res.message });
    if (res.ok) await queryClient.invalidateQueries({ queryKey: votesKey(runId) });
  }, [submitted, submitState.busy, labelledCount, ids.length, sync.unsaved, runId, queryClient]);

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (keyBelongsTo(e.target)) return;
      const cmd = commandFor(e, run.labelSet);
      if (!cmd) return;
      if (help && cmd.type !== 'help' && cmd.type !== 'close') return;
      e.preventDefault();
      if (
        applyViewCommand(cmd, {
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
      switch (cmd.type) {
        case 'label':
          change(cmd.label === 'noise' ? { label: cmd.label } : { label: cmd.label, noiseKind: null }, cmd.label !== 'noise');
          break;
        case 'kind': {
          const kind = run.noiseKinds[cmd.index];
          if (kind) change({ label: 'noise', noiseKind: kind }, true);
          break;
        }
        case 'confidence':
          if (vote?.label) change({ confidence: cmd.value });
          break;
        case 'nextUnlabelled': {
          const j = firstUnlabelled(index + 1);
          if (j >= 0 && j !== index) goTo(j);
          break;
        }
        case 'note':
          noteRef.current?.focus();
          break;
        case 'autoAdvance':
          setPrefs((p) => ({ ...p, autoAdvance: !p.autoAdvance }));
          break;
        case 'flag':
          toggleFlag(component.id);
          break;
        case 'filter':
          setFilter((f) => (f === 'all' ? 'unlabelled' : f === 'unlabelled' ? 'flagged' : 'all'));
          break;
        case 'help':
          setHelp((h) => !h);
          break;
        case 'close':
          setHelp(false);
          clearRefusal();
          break;
        case 'submit':
          void submit();
          break;
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [
    run.labelSet,
    run.structural,
    run.noiseKinds,
    help,
    change,
    vote?.label,
    goTo,
    index,
    firstUnlabelled,
    submit,
    clearRefusal,
    setPrefs,
    order,
    toggleFlag,
    component.id,
  ]);

  const peak = component.features.peakZ == null ? null : Math.abs(Number(component.features.peakZ));
  const files = `/api/runs/${runId}/files`;
  const othersHere = others?.filter((o) => o.componentId === component.id) ?? null;
  const pct = ids.length ? (100 * labelledCount) / ids.length : 0;

  return (
    <div className="flex flex-col gap-3" data-testid="rating-desk">
      <header className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <div className="min-w-0">
          <h1 className="truncate font-mono text-sm font-semibold" data-testid="desk-run-name">
            {run.name}
          </h1>
          <p className="text-xs text-ink-muted">{run.studyName}</p>
        </div>
        {run.warnings?.length ? (
          <ul className="basis-full text-xs text-alarm" data-testid="desk-decomposition-warnings">
            {run.warnings.map((w) => (
              <li key={w.code} data-testid={`desk-warning-${w.code}`}>
                {w.message}
              </li>
            ))}
          </ul>
        ) : null}
        <p className="font-mono text-sm" data-testid="desk-position" aria-live="polite">
          Component <span className="text-ink">{component.idx}</span> of {run.k}
        </p>
        <button
          type="button"
          onClick={() => toggleFlag(component.id)}
          aria-pressed={flags.has(component.id)}
          className={`rounded border px-2 py-0.5 text-xs ${flags.has(component.id) ? 'border-alarm text-alarm' : 'border-line-strong text-ink-muted'}`}
          data-testid="flag-toggle"
        >
          {flags.has(component.id) ? 'Flagged' : 'Flag'} (F)
        </button>
        {run.reproducibility?.hidden ? (
          <p
            className="text-xs text-ink-muted"
            data-testid="desk-hidden-note"
            title="The study hides components whose reproducibility is below its threshold; the lead decides them."
          >
            {run.reproducibility.hidden} of {run.k} hidden (reproducibility below {run.reproducibility.threshold.toFixed(2)})
          </p>
        ) : null}
        <div className="flex min-w-48 flex-1 items-center gap-2">
          <div
            className="h-1.5 flex-1 rounded bg-ground-sunken"
            role="progressbar"
            aria-label="Components labelled"
            aria-valuemin={0}
            aria-valuemax={ids.length}
            aria-valuenow={labelledCount}
            data-testid="desk-progress"
          >
            <div className="h-1.5 rounded bg-lumen transition-[width]" style={{ width: `${pct}%` }} />
          </div>
          <span className="font-mono text-xs text-ink-muted" data-testid="desk-progress-text">
            {labelledCount}/{ids.length}
          </span>
        </div>
        <p
          className={`text-xs ${sync.phase === 'retrying' ? 'text-alarm' : 'text-ink-muted'}`}
          data-testid="sync-status"
          data-phase={sync.phase}
          role="status"
        >
          {sync.unsaved === 0
            ? 'All votes saved'
            : sync.phase === 'retrying'
              ? `${sync.unsaved} unsaved, retrying`
              : `Saving ${sync.unsaved}…`}
        </p>
        <button
          type="button"
          onClick={() => setHelp(true)}
          className="rounded border border-line-strong px-2 py-1 text-xs text-ink-muted hover:text-ink"
          data-testid="help-button"
        >
          Keys <kbd className="font-mono">?</kbd>
        </button>
        {submitted ? (
          <span className="text-xs text-ink-muted" data-testid="submitted-note">
            Submitted {status?.submittedAt?.replace('T', ' ').slice(0, 16)} UTC · votes frozen
            {released ? ' (released)' : '; if a label must change, ask the study lead to reopen the run for you'}
          </span>
        ) : (
          <button
            type="button"
            onClick={() => void submit()}
            disabled={submitState.busy}
            data-testid="submit-run"
            className={`rounded px-3 py-1 text-sm font-medium ${labelledCount === ids.length ? 'bg-lumen text-ground hover:bg-lumen-strong' : 'border border-line-strong text-ink-muted'}`}
          >
            Submit run <kbd className="ml-1 font-mono text-[10px]">Ctrl+Enter</kbd>
          </button>
        )}
      </header>

      {sync.refusal ? (
        <Notice kind="error" testId="vote-refusal">
          {sync.refusal}
        </Notice>
      ) : null}
      {submitState.message ? (
        <Notice kind="error" testId="submit-message">
          {submitState.message}
        </Notice>
      ) : null}
      {viewerError ? (
        <Notice kind="error" testId="viewer-error">
          {viewerError}
        </Notice>
      ) : null}
      {seriesError ? (
        <Notice kind="error" testId="series-error">
          {seriesError}
        </Notice>
      ) : null}

      <ComponentStrip
        ids={ids}
        current={index}
        votes={votes}
        onPick={goTo}
        numbers={numbers}
        lowIds={lowIds}
        flags={flags}
        filter={filter}
        onFilter={setFilter}
      />
      {goToOpen ? <GoToBox k={run.k} go={goToNumber} onClose={() => setGoToOpen(false)} /> : null}

      <div className="grid gap-3 lg:grid-cols-[minmax(0,1fr)_20rem]">
        <div className="flex min-w-0 flex-col gap-2">
          <MapPanel
            meanUrl={`${files}/mean.nii.gz?d=${run.decompositionId}`}
            mapsUrl={`/api/runs/${runId}/maps`}
            mapsVersion={run.decompositionId}
            structuralUrl={run.structural ? `${files}/structural.nii.gz?s=${run.structural.version}` : null}
            frame={component.idx - 1}
            peakZ={peak}
            prefs={prefs}
            setPrefs={setPrefs}
            api={viewerApi}
            onDrawn={onDrawn}
            onError={setViewerError}
          />
          <label className="flex items-center gap-1 text-xs text-ink-muted">
            <input
              type="checkbox"
              checked={prefs.autoAdvance}
              onChange={() => setPrefs((p) => ({ ...p, autoAdvance: !p.autoAdvance }))}
              className="accent-lumen"
            />
            auto-advance (A)
          </label>
          <ChartsPanel
            run={run}
            series={seriesOf(component.id)}
            showMotion={prefs.showMotion}
            onShowMotion={(on) => setPrefs((p) => ({ ...p, showMotion: on }))}
          />
        </div>
        <aside className="flex flex-col gap-3" aria-label="Vote and features">
          <VerdictPanel
            ref={noteRef}
            vote={vote}
            labelSet={run.labelSet}
            noiseKinds={run.noiseKinds}
            disabled={frozen}
            onChange={(f) => change(f)}
            onNoteDone={() => noteRef.current?.blur()}
          />
          {othersHere ? <OthersVotes votes={othersHere} /> : null}
          <SuggestionAfterVote runId={runId} componentId={component.id} voteSaved={!!vote?.label && !vote.pending} />
          <FeaturePanel component={component} k={run.k} reproducibilityThreshold={run.reproducibility?.threshold} />
          <Link href="/" className="text-xs text-ink-muted hover:text-ink">
            ← Back to my queue
          </Link>
        </aside>
      </div>
      {help ? <HelpOverlay labelSet={run.labelSet} noiseKinds={run.noiseKinds} onClose={() => setHelp(false)} /> : null}
    </div>
  );
}
