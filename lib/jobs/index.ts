// Public entry of the job queue. Route handlers: enqueueJob (decompositions: lib/runs/queue-job.ts), latestJobForRun,
// getJob, cancelJob. Job kinds import defineJobKind from ./types.
export * from './errors';
export * from './payloads';
export * from './queue';
