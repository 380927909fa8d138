import { describe, expect, it, vi } from 'vitest';
import { AppError, toAppError } from '@/lib/errors';

// Next bundles its route handlers apart from server.ts, so one process holds two copies of lib/errors.ts; objects
// shared through globalThis (the group appender) throw one copy's AppError to code that checks with the other's.
async function secondCopy(): Promise<typeof import('@/lib/errors')> {
  vi.resetModules();
  return import('@/lib/errors');
}

describe('AppError across two copies of its module', () => {
  it('is recognised by the other copy, keeping its status and field', async () => {
    const other = await secondCopy();
    expect(other.AppError).not.toBe(AppError);
    const made = new other.AppError('not_found:session', 'No such session');
    expect(made instanceof AppError).toBe(true);
    const mapped = toAppError(made, 'reading');
    expect(mapped).toBe(made);
    expect(mapped.status).toBe(404);
    const field = toAppError(new other.AppError('bad_request:reading', 'x', 'reading.divisions'));
    expect([field.status, field.field]).toEqual([400, 'reading.divisions']);
  });

  it('does not take a plain error or a look-alike object for one', async () => {
    expect(new Error('boom') instanceof AppError).toBe(false);
    expect({ code: 'not_found:session', status: 404 } instanceof AppError).toBe(false);
    expect((null as unknown) instanceof AppError).toBe(false);
    const spy = vi.spyOn(console, 'error').mockImplementation(() => undefined);
    expect(toAppError(new Error('boom')).status).toBe(500);
    spy.mockRestore();
  });
});
