/**
 * Payloads of the notification job kinds (zod only), registered in lib/jobs/payloads.ts: queued
 * through enqueueJob by ./queue.ts and validated again by the worker when it claims a job.
 */
import { z } from 'zod';

export const NOTIFY_ASSIGNMENTS = 'notify-assignments';
export const NOTIFY_VOTES_COMPLETE = 'notify-votes-complete';
export const NOTIFY_OVERDUE = 'notify-overdue';
export type NotifyKind = typeof NOTIFY_ASSIGNMENTS | typeof NOTIFY_VOTES_COMPLETE | typeof NOTIFY_OVERDUE;

/** notify-assignments: no parameters — it collects every assignment not yet notified. */
export const notifyAssignmentsPayloadSchema = z.object({}).strict();
/** notify-votes-complete: no parameters — it finds every run whose assigned raters all submitted. */
export const notifyVotesCompletePayloadSchema = z.object({}).strict();
/** notify-overdue: `repeat` false for a one-off summary (the daily job re-queues itself). */
export const notifyOverduePayloadSchema = z.object({ repeat: z.boolean().default(true) }).strict();
