/**
 * GET /api/runs/:id/votes — the caller's own votes on a run assigned to them, the assignment's
 * status, and other raters' votes only as blinding allows (lib/db/queries/votes.ts votesPayloadOf);
 * the same 404 as the desk for a run that is not theirs.
 */
import 'server-only';
import { votesPayloadOf } from '@/lib/db/queries/votes';
import type { VotesPayload } from '@/lib/desk/types';
import { requireAssignedRun } from '@/lib/runs/assigned-run';

export async function listVotesForRater({ user, runId }: { user: { id: number }; runId: number }): Promise<VotesPayload> {
  const run = await requireAssignedRun({ user, runId });
  return votesPayloadOf({ user, run });
}
