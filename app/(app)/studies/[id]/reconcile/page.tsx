import type { Metadata } from 'next';
import { studyPageAccess } from '@/lib/auth/page-access';
import { listReconcileItems } from '@/lib/db/queries/reconcile';
import { ReconcileClient } from './reconcile-client';

export const metadata: Metadata = { title: 'Reconcile' };

export default async function ReconcilePage({ params }: { params: Promise<{ id: string }> }) {
  const { access } = await studyPageAccess('decisions.reconcile', (await params).id, { studyRule: 'lead' });
  const studyId = access.studyId;
  const items = await listReconcileItems({ studyId, include: 'pending' });
  return <ReconcileClient studyId={studyId} studyName={access.name} initialItems={items} />;
}
