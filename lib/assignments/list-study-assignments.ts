import 'server-only';
import { VOTING_ROLES } from '@/lib/auth/permissions';
import { listAssignmentsOfStudy, type AssignmentRun, type StudyRater } from '@/lib/db/queries/assignments';
import { requireLedStudy, type Caller } from './lead-rules';

/** Runs × assigned raters of a study the caller leads, with each rater's progress, and the study's raters (for choosing). */
export async function listStudyAssignments({
  user,
  studyId,
}: {
  user: Caller;
  studyId: number;
}): Promise<{ runs: AssignmentRun[]; raters: StudyRater[] }> {
  await requireLedStudy({ user, studyId });
  return listAssignmentsOfStudy({ studyId, votingRoles: VOTING_ROLES });
}
