import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { leadsStudy } from '@/lib/auth/permissions';
import { listReconcileItems } from '@/lib/db/queries/reconcile';
import { ReconcileClient } from './reconcile-client';

export const metadata: Metadata = { title: 'Reconcile' };

export default async function ReconcilePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('decisions.reconcile');
  const studyId = Number((await params).id);
  const access = Number.isInteger(studyId) && studyId > 0 ? await findStudyAccess({ user, studyId }) : null;
  if (!access || !leadsStudy(access)) notFound();
  const items = await listReconcileItems({ studyId, include: 'pending' });
  return <ReconcileClient studyId={studyId} studyName={access.name} initialItems={items} />;
}
