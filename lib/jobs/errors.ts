// Typed errors of the job queue and the worker.

/** The job was cancelled while it ran; the kind stops and writes nothing more. */
export class JobCancelled extends Error {
  constructor(jobId: number) {
    super(`Job ${jobId} was cancelled.`);
    this.name = 'JobCancelled';
  }
}

/**
 * This worker no longer holds the job's lease (it expired and another worker may have taken the
 * job, or a stopping worker released it); the kind stops and writes nothing more.
 */
export class LeaseLost extends Error {
  constructor(jobId: number, workerId: string) {
    super(`Worker ${workerId} no longer holds the lease of job ${jobId}.`);
    this.name = 'LeaseLost';
  }
}

/**
 * A failure that retrying cannot fix (a bad payload, a run that no longer exists): the job fails
 * at once, whatever attempts remain. The message is shown to people as it is.
 */
export class PermanentJobError extends Error {
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'PermanentJobError';
  }
}

/** A failure with a message written for people (the worker stores it as the job's `message`). */
export class JobError extends Error {
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'JobError';
  }
}

/** true for the errors that mean "stop quietly": the job is no longer ours to finish. */
export function isStopSignal(err: unknown): err is JobCancelled | LeaseLost {
  return err instanceof JobCancelled || err instanceof LeaseLost;
}
