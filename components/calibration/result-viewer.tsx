'use client';
import { useRef, useState } from 'react';
import { useDeskPrefs } from '@/lib/desk/prefs';
import type { DeskComponent, DeskRun } from '@/lib/desk/types';
import type { ViewerApi } from '@/components/viewer';
import { MapPanel } from '@/components/desk/map-panel';
import { ChartsPanel } from '@/components/desk/charts-panel';
import { Notice } from '@/components/ui/notice';

export type ResultRow = {
  componentId: number;
  idx: number;
  mine: string;
  reference: string;
  reason: string | null;
  differs: boolean;
  hf: string;
  edge: string;
};

/**
 * The rater's calibration result, component by component, with the desk's read-only viewer and
 * plots for the component picked in the table (the first that differs from the reference, to
 * start). The map and plots come from the rater's own desk files (they are assigned to the run).
 */
export function CalibrationResultViewer({ run, components, rows }: { run: DeskRun; components: DeskComponent[]; rows: ResultRow[] }) {
  const [picked, setPicked] = useState<number>(() => (rows.find((r) => r.differs) ?? rows[0])?.componentId ?? 0);
  const [prefs, setPrefs] = useDeskPrefs();
  const [viewerError, setViewerError] = useState<string | null>(null);
  const api = useRef<ViewerApi | null>(null);
  const component = components.find((c) => c.id === picked) ?? components[0];
  const files = `/api/runs/${run.runId}/files`;
  const peak = component?.features.peakZ == null ? null : Math.abs(Number(component.features.peakZ));
  return (
    <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
      <table className="w-full self-start text-sm" data-testid="calibration-result-table">
        <thead className="text-left text-xs text-ink-faint">
          <tr>
            <th className="pb-1 pr-3 font-medium">Component</th>
            <th className="pb-1 pr-3 font-medium">Your label</th>
            <th className="pb-1 pr-3 font-medium">Reference</th>
            <th className="pb-1 pr-3 font-medium">Lead&apos;s reason</th>
            <th className="pb-1 pr-3 text-right font-medium">Power &gt; 0.1 Hz</th>
            <th className="pb-1 pr-3 text-right font-medium">At brain edge</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((c) => (
            <tr
              key={c.componentId}
              className={`border-t border-line ${c.differs ? 'bg-alarm/10' : ''} ${c.componentId === component?.id ? 'outline outline-1 outline-lumen' : ''}`}
              data-testid={`calibration-result-${c.idx}`}
              data-differs={c.differs ? 'true' : 'false'}
            >
              <td className="py-1.5 pr-3 tabular-nums">
                <button
                  type="button"
                  className="text-lumen hover:text-lumen-strong"
                  onClick={() => setPicked(c.componentId)}
                  aria-pressed={c.componentId === component?.id}
                  data-testid="calibration-result-show"
                >
                  {c.idx}
                </button>
              </td>
              <td className="py-1.5 pr-3">{c.mine}</td>
              <td className="py-1.5 pr-3">{c.reference}</td>
              <td className="py-1.5 pr-3 text-ink-muted">{c.reason ?? '—'}</td>
              <td className="py-1.5 pr-3 text-right tabular-nums">{c.hf}</td>
              <td className="py-1.5 pr-3 text-right tabular-nums">{c.edge}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {component ? (
        <div className="flex min-w-0 flex-col gap-2" data-testid="calibration-result-viewer">
          <p className="font-mono text-sm" data-testid="desk-position">
            Component <span className="text-ink">{component.idx}</span> of {run.k}
          </p>
          {viewerError ? (
            <Notice kind="error" testId="viewer-error">
              {viewerError}
            </Notice>
          ) : null}
          <MapPanel
            meanUrl={`${files}/mean.nii.gz?d=${run.decompositionId}`}
            mapsUrl={`/api/runs/${run.runId}/maps`}
            mapsVersion={run.decompositionId}
            frame={component.idx - 1}
            peakZ={peak}
            prefs={prefs}
            setPrefs={setPrefs}
            api={api}
            onError={setViewerError}
          />
          <ChartsPanel
            run={run}
            series={component}
            showMotion={prefs.showMotion}
            onShowMotion={(on) => setPrefs((p) => ({ ...p, showMotion: on }))}
          />
        </div>
      ) : null}
    </div>
  );
}
