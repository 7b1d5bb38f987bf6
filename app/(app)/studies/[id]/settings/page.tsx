import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { studyWithAccess } from '@/lib/studies/study-with-access';
import { listMembers } from '@/lib/db/queries/members';
import { StudyForm } from '@/components/studies/study-form';
import { MembersPanel } from '@/components/studies/members-panel';
import { Panel } from '@/components/ui/panel';
import {
  CONSENSUS_NAMES,
  DIM_METHOD_NAMES,
  NOISE_KIND_NAMES,
  LABEL_NAMES,
  type LabelKey,
  LOW_REPRODUCIBILITY_NAMES,
} from '@/lib/vocabulary/protocol';

export const metadata: Metadata = { title: 'Study protocol' };

export default async function StudySettingsPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('studies.read');
  const id = Number((await params).id);
  if (!Number.isInteger(id) || id <= 0) notFound();
  const access = await studyWithAccess({ user, studyId: id });
  if (!access) notFound();
  const { study } = access;
  const members = await listMembers({ studyId: id });
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold">{study.name}: protocol and members</h1>
      <Panel title="Protocol">
        {access.canManage ? (
          <StudyForm
            studyId={id}
            initial={{
              name: study.name,
              description: study.description,
              ratersPerRun: study.ratersPerRun,
              consensusRule: study.consensusRule,
              allowUncertain: study.allowUncertain,
              noiseKinds: study.noiseKinds,
              blinding: study.blinding,
              showVotesAfterSubmit: study.showVotesAfterSubmit,
              dropVolumes: study.dropVolumes,
              dimMethod: study.dimMethod,
              fixedComponents: study.fixedComponents,
              varianceFraction: study.varianceFraction,
              varianceNorm: study.varianceNorm,
              detrend: study.detrend,
              reproducibilityThreshold: study.reproducibilityThreshold,
              lowReproducibility: study.lowReproducibility,
            }}
          />
        ) : (
          <dl className="grid grid-cols-[14rem_1fr] gap-y-1 text-sm">
            <dt className="text-ink-muted">Raters per run</dt>
            <dd>{study.ratersPerRun}</dd>
            <dt className="text-ink-muted">Consensus</dt>
            <dd>{CONSENSUS_NAMES[study.consensusRule]}</dd>
            <dt className="text-ink-muted">Labels</dt>
            <dd>{study.labelSet.map((l) => LABEL_NAMES[l as LabelKey] ?? l).join(', ')}</dd>
            <dt className="text-ink-muted">Noise kinds</dt>
            <dd>{study.noiseKinds.map((k) => NOISE_KIND_NAMES[k] ?? k).join(', ')}</dd>
            <dt className="text-ink-muted">Blinding</dt>
            <dd>
              {study.blinding ? 'on' : 'off'}
              {study.showVotesAfterSubmit ? ', votes shown after submit' : ''}
            </dd>
            <dt className="text-ink-muted">Initial volumes dropped</dt>
            <dd>{study.dropVolumes}</dd>
            <dt className="text-ink-muted">Number of components</dt>
            <dd>{DIM_METHOD_NAMES[study.dimMethod]}</dd>
            <dt className="text-ink-muted">Variance normalisation</dt>
            <dd>{study.varianceNorm ? 'on' : 'off'}</dd>
            <dt className="text-ink-muted">Detrend</dt>
            <dd>{study.detrend ? 'linear' : 'off'}</dd>
            <dt className="text-ink-muted">Low reproducibility</dt>
            <dd>
              below {study.reproducibilityThreshold.toFixed(2)}: {LOW_REPRODUCIBILITY_NAMES[study.lowReproducibility]}
            </dd>
          </dl>
        )}
      </Panel>
      <Panel title="Members">
        <MembersPanel studyId={id} initial={members} canManage={access.canManage} />
      </Panel>
    </div>
  );
}
