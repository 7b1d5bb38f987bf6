import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { submittedVotesOfRun } from '@/lib/db/queries/run-view';
import { loadRunForViewing } from '@/lib/runs/load-run-for-viewing';
import { ViewClient } from './view-client';

export const metadata: Metadata = { title: 'Run (read-only)' };

/** The read-only run view: the desk's viewer, plots and features for the study's leads and observers; leads also see submitted votes. */
export default async function RunViewPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('runs.read');
  const runId = Number((await params).id);
  if (!Number.isInteger(runId) || runId <= 0) notFound();
  const loaded = await loadRunForViewing({ user, runId });
  if (!loaded) notFound();
  const votes = loaded.role === 'lead' ? await submittedVotesOfRun({ runId, decompositionId: loaded.run.decompositionId }) : null;
  return <ViewClient run={loaded.run} components={loaded.components} role={loaded.role} votes={votes} />;
}
