/** The states of a job row (jobs.status): queued → running → succeeded | failed | cancelled. */
export const JOB_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];
