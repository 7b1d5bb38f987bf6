import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { findDecisionContext, lockDecision, writeLeadDecision } from '@/lib/db/queries/reconcile';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import type { DecisionConflict, LeadDecisionInput } from './schema';

type RecordedDecision = { componentId: number; method: string; label: string; noiseKind: string | null };

/**
 * Records a lead's decision on a component of their study (reconciled when it was pending, an
 * override of an automatic decision otherwise), with the reason, in one transaction with its audit
 * entry. Releases keep the decisions they froze; a change after a release needs a new release.
 * With `baseVersion`, a decision that changed since the lead saw it is not touched: the attempt is
 * audited (decision.conflict) and the current decision returned as `conflict`.
 */
export async function recordLeadDecision({
  studyId,
  leadId,
  input,
}: {
  studyId: number;
  leadId: number;
  input: LeadDecisionInput;
}): Promise<RecordedDecision | DecisionConflict> {
  return inTransaction(async (trx): Promise<RecordedDecision | DecisionConflict> => {
    const ctx = await findDecisionContext(trx, { studyId, componentId: input.componentId });
    if (!ctx) throw new AppError('not_found', 'That component is not part of this study (or its decomposition was replaced).');
    const { labels, kinds } = ctx;
    if (!labels.includes(input.label)) {
      throw new AppError('validation', `"${input.label}" is not one of this study's labels (${labels.join(', ')}).`, {
        label: ['Choose one of the study’s labels.'],
      });
    }
    const noiseKind = input.label === 'noise' ? (input.noiseKind ?? null) : null;
    if (noiseKind && !kinds.includes(noiseKind)) {
      throw new AppError('validation', `"${noiseKind}" is not one of this study's noise kinds.`, {
        noiseKind: ['Choose one of the study’s noise kinds.'],
      });
    }
    const existing = await lockDecision(trx, { componentId: input.componentId });
    if (input.baseVersion !== undefined && (existing?.version ?? 0) !== input.baseVersion) {
      // another lead (or a changed vote) got there first: refuse, and keep the attempt in the audit log
      const current = {
        label: existing?.label ?? null,
        noiseKind: existing?.noiseKind ?? null,
        method: existing?.method ?? 'pending',
        decidedBy: existing?.decidedBy ?? null,
      };
      await recordAudit(
        {
          actorId: leadId,
          action: 'decision.conflict',
          targetType: 'component',
          targetId: input.componentId,
          studyId,
          detail: {
            runId: ctx.runId,
            index: ctx.idx,
            baseVersion: input.baseVersion,
            version: existing?.version ?? 0,
            current,
            refused: { label: input.label, noiseKind, reason: input.reason },
          },
        },
        trx,
      );
      return { conflict: current };
    }
    const method = !existing || existing.method === 'pending' ? 'reconciled' : existing.method === 'reconciled' ? 'reconciled' : 'override';
    await writeLeadDecision(trx, {
      existingId: existing?.id ?? null,
      componentId: input.componentId,
      runId: ctx.runId,
      label: input.label,
      noiseKind,
      method,
      leadId,
      reason: input.reason,
    });
    await recordAudit(
      {
        actorId: leadId,
        action: method === 'override' ? 'decision.override' : 'decision.reconcile',
        targetType: 'component',
        targetId: input.componentId,
        studyId,
        detail: {
          runId: ctx.runId,
          index: ctx.idx,
          before: existing ? { label: existing.label, noiseKind: existing.noiseKind, method: existing.method } : null,
          label: input.label,
          noiseKind,
          reason: input.reason,
        },
      },
      trx,
    );
    return { componentId: input.componentId, method, label: input.label, noiseKind };
  });
}
