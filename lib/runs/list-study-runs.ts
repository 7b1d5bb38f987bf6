/**
 * The runs of a study the user may see, as rows of the runs table. Per-run agreement (α) only for
 * those who see every run — admins, the study's leads and observers — never a rater (blinding).
 */
import 'server-only';
import { listRunRows, type RunListItem } from '@/lib/db/queries/runs';
import type { UserRow } from '@/lib/db/queries/users';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { runAgreements } from '@/lib/reports/run-agreements';
import { seesAllRuns } from '@/lib/auth/permissions';

export async function listRunsForStudy({
  user,
  studyId,
  runId,
}: {
  user: Pick<UserRow, 'id' | 'role'>;
  studyId: number;
  runId?: number;
}): Promise<RunListItem[]> {
  const rows = await listRunRows({ user, studyId, runId });
  const access = await findStudyAccess({ user, studyId });
  if (!access || !seesAllRuns(access)) return rows;
  const agreement = await runAgreements({ studyId, runIds: rows.map((r) => r.id) });
  return rows.map((r) => ({ ...r, agreement: agreement.get(r.id) ?? null }));
}
