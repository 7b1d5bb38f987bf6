import 'server-only';
import { countOtherLeads } from '@/lib/db/queries/members';
import type { Trx } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';

/** Refuses (409) to take away the study's only lead (changing their study role, or removing them). */
export async function assertAnotherLead(trx: Trx, studyId: number, userId: number): Promise<void> {
  if ((await countOtherLeads(trx, { studyId, userId })) === 0) {
    throw new AppError('conflict', "This is the study's only lead. Add another lead first, then change or remove this one.");
  }
}
