import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { insertStudy } from '@/lib/db/queries/studies';
import type { UserRow } from '@/lib/db/queries/users';
import { inTransaction } from '@/lib/db/transaction';
import type { StudyValues } from './schema';

/** Creates a study; its creator becomes its lead member. Audited. */
export async function createStudy({ user, values }: { user: Pick<UserRow, 'id'>; values: StudyValues }): Promise<number> {
  return inTransaction(async (trx) => {
    const id = await insertStudy(trx, { createdBy: user.id, values });
    await recordAudit(
      { actorId: user.id, action: 'study.create', targetType: 'study', targetId: id, studyId: id, detail: { name: values.name } },
      trx,
    );
    return id;
  });
}
