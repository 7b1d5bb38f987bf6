import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { preload } from 'react-dom';
import { requirePageUser } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { loadDeskComponents } from '@/lib/runs/load-desk-components';
import { listVotesForRater } from '@/lib/votes/list-votes-for-rater';
import { deskStartIndex } from '@/lib/desk/start-index';
import { deskPagePayload } from '@/lib/desk/page-payload';
import { deskSeriesUrl } from '@/lib/desk/series-payload';
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
  // the first map, the underlay and the series are asked for with the page's data: Next sends these
  // hints with the flight data (not in the HTML head), so the browser starts them at hydration, before
  // the desk's effects would. The same addresses and fetch mode as lib/desk/use-desk-maps.ts and the
  // viewer use, so the browser reuses them. (<link rel="preload"> in the head: warm loads slower, README.)
  const { run } = components;
  const start = deskStartIndex(run.lastComponentIdx, components.components, votes.mine);
  const shown = components.components[start];
  const fetched = { as: 'fetch', crossOrigin: 'anonymous' } as const;
  preload(`/api/runs/${runId}/maps/layout?d=${run.decompositionId}`, fetched);
  if (shown) preload(`/api/runs/${runId}/maps/${shown.idx}-${shown.idx}?d=${run.decompositionId}`, fetched);
  if (!run.structural) preload(`/api/runs/${runId}/files/mean.nii.gz?d=${run.decompositionId}`, fetched);
  preload(deskSeriesUrl(runId, run.decompositionId), fetched);
  // the page carries the shown component's series; the others' come in one binary payload (lib/desk/use-desk-series.ts)
  return <RateClient runId={runId} userId={user.id} initialComponents={deskPagePayload(components, start)} initialVotes={votes} />;
}
