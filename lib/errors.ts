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

// A brand shared through the global symbol registry: Next bundles its routes apart from server.ts, so one process can
// hold two copies of this module, and an AppError made by one copy (say, by the group appender both share through
// globalThis) must still be an AppError to the other copy's `instanceof`.
const brand = Symbol.for('levelwire.AppError');

export class AppError extends Error {
  static [Symbol.hasInstance](value: unknown): boolean {
    return typeof value === 'object' && value !== null && (value as { [brand]?: unknown })[brand] === true;
  }

  readonly [brand] = true;
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
  // An unknown key is itself the field at fault, not the object that holds it (which may be the whole body).
  const path = issue?.code === 'unrecognized_keys' ? [...issue.path, issue.keys[0]!] : (issue?.path ?? []);
  const field = path.length > 0 ? path.join('.') : undefined;
  const what = field ? `${field}: ${issue?.message}` : (issue?.message ?? 'invalid input');
  return new AppError(`bad_request:${surface}`, what, field);
}

/**
 * PostgreSQL's connection-level failures (a restart, a shutdown, a refused or cut connection) by SQLSTATE or
 * Node error code; the driver and Drizzle may wrap them, so the cause chain is searched.
 */
const DATABASE_DOWN_CODES = new Set(['57P01', '57P02', '57P03', '53300', '08000', '08001', '08003', '08006', 'ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT']);
const DATABASE_DOWN_TEXT = /Connection terminated|connection timeout|Client has encountered a connection error|Client was closed|Cannot use a pool after calling end/i;

export function isDatabaseUnavailable(err: unknown): boolean {
  let e = err as { code?: unknown; message?: unknown; cause?: unknown } | undefined;
  for (let depth = 0; e && typeof e === 'object' && depth < 6; depth += 1, e = e.cause as typeof e) {
    if (typeof e.code === 'string' && DATABASE_DOWN_CODES.has(e.code)) return true;
    if (typeof e.message === 'string' && DATABASE_DOWN_TEXT.test(e.message)) return true;
  }
  return false;
}

/**
 * A 400 naming the first string (or key) of `value` that holds a NUL character, or null when none does. PostgreSQL's
 * text and jsonb cannot store one, so it would otherwise fail at the insert as a 500. Walks without recursion: a value
 * nested thousands deep cannot overflow the stack.
 */
export function nulCharacterError(value: unknown, surface: string): AppError | null {
  type Node = { value: unknown; key: string | number | null; parent: Node | null };
  const pathOf = (n: Node) => {
    const keys: (string | number)[] = [];
    for (let at: Node | null = n; at && at.key !== null; at = at.parent) keys.unshift(at.key);
    return keys.join('.');
  };
  const found = (n: Node) => {
    const field = pathOf(n) || undefined;
    return new AppError(`bad_request:${surface}`, `${field ?? 'the payload'}: must not hold a NUL character`, field);
  };
  const stack: Node[] = [{ value, key: null, parent: null }];
  while (stack.length > 0) {
    const node = stack.pop()!;
    const v = node.value;
    if (typeof v === 'string') {
      if (v.includes('\u0000')) return found(node);
    } else if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i -= 1) stack.push({ value: v[i], key: i, parent: node });
    } else if (v && typeof v === 'object' && !ArrayBuffer.isView(v)) {
      const entries = Object.entries(v);
      for (let i = entries.length - 1; i >= 0; i -= 1) {
        const [k, child] = entries[i]!;
        const childNode = { value: child, key: k, parent: node };
        if (k.includes('\u0000')) return found(childNode);
        stack.push(childNode);
      }
    }
  }
  return null;
}

/** Anything thrown, as an AppError; unknown errors are logged and hidden behind a generic message. */
export function toAppError(err: unknown, surface = 'api'): AppError {
  if (err instanceof AppError) return err;
  if (err instanceof $ZodError) return fromZod(err, surface);
  if (isDatabaseUnavailable(err)) {
    console.warn(`[levelwire] database unavailable (${surface}):`, err instanceof Error ? err.message : err);
    return new AppError('offline:database', 'The database cannot be reached just now; try again in a moment (a resend is never stored twice).');
  }
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
