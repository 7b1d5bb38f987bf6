import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { changesProtocol, writeProtocol } from '@/lib/db/queries/studies';
import type { UserRow } from '@/lib/db/queries/users';
import { inTransaction } from '@/lib/db/transaction';
import type { StudyUpdate } from './schema';

/** Changes a study's protocol (the caller has checked it may manage the study). Audited with the changed fields. */
export async function updateStudy({
  user,
  studyId,
  values,
}: {
  user: Pick<UserRow, 'id'>;
  studyId: number;
  values: StudyUpdate;
}): Promise<void> {
  if (!changesProtocol(values)) return;
  await inTransaction(async (trx) => {
    await writeProtocol(trx, { studyId, values });
    await recordAudit(
      {
        actorId: user.id,
        action: 'study.update',
        targetType: 'study',
        targetId: studyId,
        studyId,
        detail: { changed: Object.keys(values) },
      },
      trx,
    );
  });
}
