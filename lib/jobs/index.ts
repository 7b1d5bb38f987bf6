// Public entry of the job queue. Route handlers: enqueueJob / enqueueDecomposition, latestJobForRun,
// getJob, cancelJob. The worker: startWorker with jobKinds.
export * from './errors';
export * from './payloads';
export * from './queue';
export type { JobContext, JobKind, JobLogger } from './types';
export { defineJobKind } from './types';
