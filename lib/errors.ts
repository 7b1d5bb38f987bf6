import { ZodError } from 'zod';
import { sentence } from '@/lib/text';

export type AppErrorCode =
  | 'bad_request'
  | 'validation'
  | 'unauthenticated'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'too_large'
  | 'unsupported_media_type'
  | 'too_many_requests'
  | 'insufficient_storage'
  | 'unavailable'
  | 'internal';

const STATUS: Record<AppErrorCode, number> = {
  bad_request: 400,
  validation: 422,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  too_large: 413,
  unsupported_media_type: 415,
  too_many_requests: 429,
  insufficient_storage: 507,
  unavailable: 503,
  internal: 500,
};

/** The one error type every route handler and server action answers with. */
export class AppError extends Error {
  readonly code: AppErrorCode;
  readonly fields?: Record<string, string[]>;

  constructor(code: AppErrorCode, message: string, fields?: Record<string, string[]>) {
    super(message);
    this.name = 'AppError';
    this.code = code;
    this.fields = fields;
  }

  get status(): number {
    return STATUS[this.code];
  }

  toJSON() {
    return { error: { code: this.code, message: this.message, ...(this.fields ? { fields: this.fields } : {}) } };
  }

  toResponse(): Response {
    return Response.json(this.toJSON(), { status: this.status });
  }

  static fromZod(err: ZodError, what = 'The request'): AppError {
    const fields: Record<string, string[]> = {};
    for (const issue of err.issues) {
      const key = issue.path.length ? issue.path.join('.') : '_';
      (fields[key] ??= []).push(issue.message);
    }
    const first = err.issues[0];
    const where = first?.path.length ? ` (${first.path.join('.')})` : '';
    return new AppError('validation', sentence(`${what} is not valid${where}: ${first?.message ?? 'check the fields'}`), fields);
  }
}

export const unauthenticated = () => new AppError('unauthenticated', 'Sign in to continue.');
export const forbidden = (what = 'this') =>
  new AppError('forbidden', `Your role does not allow ${what}. Ask a study lead or the facility admin if you need it.`);
export const notFound = (what = 'The item') => new AppError('not_found', `${what} was not found.`);
