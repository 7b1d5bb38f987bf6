// Public entry of the job queue. Route handlers: enqueueJob / enqueueDecomposition, latestJobForRun,
// getJob, cancelJob. Job kinds import defineJobKind from ./types.
export * from './errors';
export * from './payloads';
export * from './queue';
