import { z } from 'zod';

/**
 * The query every list route takes: free-text filter, one sort column from an allowed set, direction,
 * page (from 1) and page size. Sorting, filtering and paging happen in PostgreSQL, never in the browser.
 */
export function listQuery<const S extends readonly [string, ...string[]]>(sortable: S, defaultSort: S[number]) {
  return z.object({
    q: z.string().trim().max(200, 'must be at most 200 characters').optional().default(''),
    sort: z.enum(sortable, { error: `must be one of ${sortable.join(', ')}` }).default(defaultSort as never),
    dir: z.enum(['asc', 'desc'], { error: 'must be "asc" or "desc"' }).default('asc'),
    page: z.coerce.number({ error: 'must be a number' }).int('must be a whole number').min(1, 'must be 1 or more').default(1),
    pageSize: z.coerce.number({ error: 'must be a number' }).int('must be a whole number').min(1, 'must be 1 or more').max(200, 'must be at most 200').default(25),
  });
}

export type ListQuery<S extends string = string> = { q: string; sort: S; dir: 'asc' | 'desc'; page: number; pageSize: number };
export type Page<T> = { rows: T[]; total: number; page: number; pageSize: number };

/** `%term%` for ILIKE with the user's own % and _ taken literally. */
export function likePattern(q: string): string {
  return `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** URL search params of a request as a plain object, for a list query schema. */
export function searchParamsOf(req: Request): Record<string, string> {
  return Object.fromEntries(new URL(req.url).searchParams);
}
