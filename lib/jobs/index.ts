// Public entry of the job queue. Route handlers: enqueueJob (decompositions: lib/runs/queue-job.ts), latestJobForRun,
// getJob, cancelJob. Job kinds (lib/worker/kinds) import defineJobKind from lib/worker/types.ts.
export * from './errors';
export * from './payloads';
export * from './queue';
