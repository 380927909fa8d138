import { NextResponse } from 'next/server';
import type { ZodObject, ZodRawShape, ZodType } from 'zod';
import * as z from 'zod/mini';
import { AppError, fromZod, nulCharacterError, problem, toAppError } from './errors';

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

/** Parses with a zod schema; a failure, or text the database cannot store (a NUL character), is a 400 naming the field. */
export function parseWith<S extends z.ZodMiniType | z.core.$ZodType>(schema: S, value: unknown, surface: string): z.output<S> {
  const parsed = z.safeParse(schema as z.core.$ZodType, value);
  if (!parsed.success) throw fromZod(parsed.error, surface);
  const nul = nulCharacterError(parsed.data, surface);
  if (nul) throw nul;
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

/**
 * The body's bytes, refused (400 naming `file`, "larger than `label` MB") past `maxBytes` without reading the rest: by
 * the declared length first, then while reading, so a chunked body with no length is capped too.
 */
async function cappedBytes(req: Request, maxBytes: number, surface: string, labelBytes = maxBytes): Promise<Buffer> {
  const tooLarge = () => new AppError(`bad_request:${surface}`, `file: larger than ${labelBytes / 1024 / 1024} MB`, 'file');
  if (Number(req.headers.get('content-length') ?? 0) > maxBytes) throw tooLarge();
  if (!req.body) return Buffer.alloc(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > maxBytes) {
      // Left unread rather than cancelled: cancelling destroys the connection before the 400 is written, and the
      // client would see a reset instead of the answer. The server closes the connection once the answer is out.
      reader.releaseLock();
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks);
}

/** The body as UTF-8 text (a byte-order mark dropped, as `req.text()` does), capped as `cappedBytes`. */
export async function cappedText(req: Request, maxBytes: number, surface: string): Promise<string> {
  return new TextDecoder().decode(await cappedBytes(req, maxBytes, surface));
}

/** Room for the multipart envelope and the text fields around a file at the size cap. */
const MULTIPART_ENVELOPE_BYTES = 64 * 1024;

/** A multipart/form-data body whose file may be up to `fileMaxBytes`; anything else is a 400 naming `file`. */
export async function cappedForm(req: Request, fileMaxBytes: number, surface: string): Promise<FormData> {
  const type = req.headers.get('content-type') ?? '';
  const notMultipart = () => new AppError(`bad_request:${surface}`, 'The body must be multipart/form-data with a "file" field', 'file');
  if (!type.startsWith('multipart/form-data')) throw notMultipart();
  const bytes = await cappedBytes(req, fileMaxBytes + MULTIPART_ENVELOPE_BYTES, surface, fileMaxBytes);
  return new Response(new Uint8Array(bytes), { headers: { 'content-type': type } }).formData().catch(() => {
    throw notMultipart();
  });
}

/**
 * A PATCH body's schema from the whole record's: every key optional and its default dropped, because zod applies a
 * default even under `.partial()` and would overwrite a stored value the body never named. A body naming no key is a 400.
 */
export function patchOf<T extends ZodRawShape, C extends z.core.$ZodObjectConfig>(schema: ZodObject<T, C>) {
  const partial = schema.partial();
  const shape: Record<string, ZodType> = {};
  for (const [key, field] of Object.entries(schema.shape) as [string, z.core.$ZodType][]) {
    let inner = field;
    while (inner instanceof z.core.$ZodDefault || inner instanceof z.core.$ZodPrefault || inner instanceof z.core.$ZodOptional) inner = inner._zod.def.innerType;
    shape[key] = (inner as ZodType).optional();
  }
  return (partial.extend(shape) as unknown as typeof partial).refine((v) => Object.keys(v).length > 0, 'name at least one field to change');
}
