import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { calibrationResult } from '@/lib/db/queries/calibration';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { labelName, noiseKindName } from '@/lib/studies/labels';
import { Panel } from '@/components/ui/panel';

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
  const label = (l: string | null, k: string | null) => (l ? `${labelName(l)}${l === 'noise' && k ? ` (${noiseKindName(k)})` : ''}` : '—');
  const agree = result.components.filter((c) => c.myLabel && c.referenceLabel && c.myLabel === c.referenceLabel).length;
  const scored = result.components.filter((c) => c.myLabel && c.referenceLabel).length;
  return (
    <div className="flex flex-col gap-6">
      <div>
        <p className="text-xs text-ink-faint">
          <Link href={`/studies/${studyId}`} className="hover:underline">{access.name}</Link>
        </p>
        <h1 className="text-xl font-semibold" data-testid="calibration-result-heading">Your calibration result: {result.runName}</h1>
        <p className="text-sm text-ink-muted" data-testid="calibration-result-summary">
          You agreed with the reference on {agree} of {scored} components. Go through the ones that differ: the reference label and the lead&apos;s reason say why.
        </p>
      </div>
      <Panel title="Component by component">
        <table className="w-full text-sm" data-testid="calibration-result-table">
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
            {result.components.map((c) => {
              const differs = c.myLabel && c.referenceLabel && c.myLabel !== c.referenceLabel;
              const f = (v: number | null | undefined) => (v == null ? '—' : `${Math.round(v * 100)} %`);
              return (
                <tr key={c.componentId} className={`border-t border-line ${differs ? 'bg-alarm/10' : ''}`} data-testid={`calibration-result-${c.idx}`} data-differs={differs ? 'true' : 'false'}>
                  <td className="py-1.5 pr-3 tabular-nums">{c.idx}</td>
                  <td className="py-1.5 pr-3">{label(c.myLabel, c.myKind)}</td>
                  <td className="py-1.5 pr-3">{label(c.referenceLabel, c.referenceKind)}</td>
                  <td className="py-1.5 pr-3 text-ink-muted">{c.reason ?? '—'}</td>
                  <td className="py-1.5 pr-3 text-right tabular-nums">{f(c.features.highFrequencyPower)}</td>
                  <td className="py-1.5 pr-3 text-right tabular-nums">{f(c.features.edgeFraction)}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </Panel>
    </div>
  );
}
