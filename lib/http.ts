import { NextResponse } from 'next/server';
import * as z from 'zod/mini';
import { AppError, fromZod, problem, toAppError } from './errors';

/** Wraps a route handler: any thrown error becomes `application/problem+json` with its status; unknown errors a bare 500. */
export function route<C>(surface: string, fn: (req: Request, ctx: C) => Promise<Response>) {
  return async (req: Request, ctx: C): Promise<Response> => {
    try {
      return await fn(req, ctx);
    } catch (e) {
      const err = toAppError(e, surface);
      return NextResponse.json(problem(err), { status: err.status, headers: { 'content-type': 'application/problem+json' } });
    }
  };
}

/** Parses with a zod schema; a failure is a 400 naming the field. */
export function parseWith<S extends z.ZodMiniType | z.core.$ZodType>(schema: S, value: unknown, surface: string): z.output<S> {
  const parsed = z.safeParse(schema as z.core.$ZodType, value);
  if (!parsed.success) throw fromZod(parsed.error, surface);
  return parsed.data as z.output<S>;
}

/** The request body as JSON; a body that is not JSON is a 400. */
export async function jsonBody(req: Request, surface: string): Promise<unknown> {
  try {
    return await req.json();
  } catch {
    throw new AppError(`bad_request:${surface}`, 'The body must be JSON');
  }
}
