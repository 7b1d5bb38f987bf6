import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { calibrationResult } from '@/lib/db/queries/calibration';
import { calibrationGate, calibrationSettings } from '@/lib/db/queries/calibration-gate';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { labelName, noiseKindName } from '@/lib/vocabulary/protocol';
import { Panel } from '@/components/ui/panel';
import { loadRunShapes } from '@/lib/consensus/load-run-shapes';
import { CalibrationResultViewer, type ResultRow } from '@/components/calibration/result-viewer';

export const metadata: Metadata = { title: 'Calibration result' };

/** A rater's calibration result after submitting: their label beside the reference and the lead's reason, component by component. */
export default async function CalibrationResultPage({ params }: { params: Promise<{ id: string; runId: string }> }) {
  const user = await requirePageUser('votes.write');
  const p = await params;
  const studyId = Number(p.id);
  const runId = Number(p.runId);
  if (!Number.isInteger(studyId) || studyId <= 0 || !Number.isInteger(runId) || runId <= 0) notFound();
  const access = await findStudyAccess({ user, studyId });
  if (!access) notFound();
  const result = await calibrationResult({ studyId, runId, raterId: user.id });
  if (!result) notFound();
  const settings = await calibrationSettings({ studyId });
  const gate = await calibrationGate({ studyId, raterId: user.id });
  const label = (l: string | null, k: string | null) => (l ? `${labelName(l)}${l === 'noise' && k ? ` (${noiseKindName(k)})` : ''}` : '—');
  const agree = result.components.filter((c) => c.myLabel && c.referenceLabel && c.myLabel === c.referenceLabel).length;
  const scored = result.components.filter((c) => c.myLabel && c.referenceLabel).length;
  const pct = (v: number | null | undefined) => (v == null ? '—' : `${Math.round(v * 100)} %`);
  const rows: ResultRow[] = result.components.map((c) => ({
    componentId: c.componentId,
    idx: c.idx,
    mine: label(c.myLabel, c.myKind),
    reference: label(c.referenceLabel, c.referenceKind),
    reason: c.reason,
    differs: Boolean(c.myLabel && c.referenceLabel && c.myLabel !== c.referenceLabel),
    hf: pct(c.features.highFrequencyPower),
    edge: pct(c.features.edgeFraction),
  }));
  // the rater is assigned to the run and has submitted it (calibrationResult checked): the desk's shapes for the viewer
  const shapes = await loadRunShapes({ runId });
  return (
    <div className="flex flex-col gap-6">
      <div>
        <p className="text-xs text-ink-faint">
          <Link href={`/studies/${studyId}`} className="hover:underline">
            {access.name}
          </Link>
        </p>
        <h1 className="text-xl font-semibold" data-testid="calibration-result-heading">
          Your calibration result: {result.runName}
        </h1>
        {settings.setName ? (
          <p className="text-sm text-ink-muted" data-testid="calibration-result-set">
            Part of the calibration set “{settings.setName}”.
          </p>
        ) : null}
        <p className="text-sm text-ink-muted" data-testid="calibration-result-summary">
          You agreed with the reference on {agree} of {scored} components. Go through the ones that differ: the reference label and the
          lead&apos;s reason say why.
        </p>
      </div>
      {gate.gated ? (
        <p className={`text-sm ${gate.passes ? 'text-lumen-strong' : 'text-alarm'}`} data-testid="calibration-result-gate">
          {gate.passes
            ? 'You reach the study’s calibration threshold: live runs can be assigned to you.'
            : `No live runs yet: ${(gate.reason ?? '').replace(/^has not /, 'you have not ')} (the study’s calibration threshold).`}
        </p>
      ) : null}
      <Panel title="Component by component">
        {shapes ? (
          <CalibrationResultViewer run={shapes.run} components={shapes.components} rows={rows} />
        ) : (
          <p className="text-sm text-ink-muted">This run has no current decomposition to show.</p>
        )}
      </Panel>
    </div>
  );
}
