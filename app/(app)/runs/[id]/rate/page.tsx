import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { loadDeskComponents } from '@/lib/runs/load-desk-components';
import { listVotesForRater } from '@/lib/votes/list-votes-for-rater';
import { RateClient } from './rate-client';

export const metadata: Metadata = { title: 'Rating desk' };

export default async function RatePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('votes.write');
  const runId = Number((await params).id);
  if (!Number.isInteger(runId) || runId <= 0) notFound();
  // the same scoped queries as the API: only the rater's own votes before submission
  const [components, votes] = await Promise.all([loadDeskComponents({ user, runId }), listVotesForRater({ user, runId })]).catch((err) => {
    if (err instanceof AppError && err.code === 'not_found') notFound();
    throw err;
  });
  return <RateClient runId={runId} userId={user.id} initialComponents={components} initialVotes={votes} />;
}
