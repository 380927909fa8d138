import { $ZodError } from 'zod/v4/core';

/** Levelwire's one error vocabulary: `kind:surface` codes, each with its HTTP status. */
const statusByKind = {
  bad_request: 400,
  unauthorized: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  /** Something that existed and is no longer available (an expired report link). */
  gone: 410,
  rate_limited: 429,
  offline: 503,
  internal: 500,
} as const;

export type ErrorKind = keyof typeof statusByKind;
export type ErrorCode = `${ErrorKind}:${string}`;

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  /** The input field at fault, dotted (`reading.divisions`), when there is one. */
  readonly field?: string;

  constructor(code: ErrorCode, message: string, field?: string) {
    super(message);
    this.name = 'AppError';
    this.code = code;
    this.status = statusByKind[code.split(':')[0] as ErrorKind] ?? 500;
    this.field = field;
  }
}

/** The first problem of a zod failure as a 400 naming the field. */
export function fromZod(err: $ZodError, surface: string): AppError {
  const issue = err.issues[0];
  const field = issue && issue.path.length > 0 ? issue.path.join('.') : undefined;
  const what = field ? `${field}: ${issue?.message}` : (issue?.message ?? 'invalid input');
  return new AppError(`bad_request:${surface}`, what, field);
}

/** Anything thrown, as an AppError; unknown errors are logged and hidden behind a generic message. */
export function toAppError(err: unknown, surface = 'api'): AppError {
  if (err instanceof AppError) return err;
  if (err instanceof $ZodError) return fromZod(err, surface);
  console.error(`[levelwire] unexpected error (${surface})`, err);
  return new AppError('internal:server', 'Something went wrong on the server; nothing was changed.');
}

/** The error as an `application/problem+json` body. */
export function problem(err: AppError) {
  return {
    type: `https://levelwire.invalid/problems/${err.code.replace(':', '/')}`,
    title: err.code,
    status: err.status,
    detail: err.message,
    code: err.code,
    ...(err.field ? { field: err.field } : {}),
  };
}
