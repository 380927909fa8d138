import { describe, expect, it } from 'vitest';
import { fromZod } from '@/lib/errors';
import { levelReadingInput, readingSubmit } from '@/lib/session/commands';

const ok = { kind: 'level', axis: 'x', positionMm: 250, divisions: -1.5 };

describe('the reading schema shared by form, route and socket', () => {
  it('accepts a good reading', () => {
    expect(levelReadingInput.parse(ok)).toEqual(ok);
  });

  it.each([
    [{ ...ok, divisions: Number.NaN }, 'divisions'],
    [{ ...ok, divisions: Infinity }, 'divisions'],
    [{ ...ok, divisions: '1' }, 'divisions'],
    [{ ...ok, divisions: -100.5 }, 'divisions'],
    [{ ...ok, axis: undefined }, 'axis'],
    [{ ...ok, axis: 'z' }, 'axis'],
    [{ ...ok, positionMm: 5000.1 }, 'positionMm'],
  ])('names the field in the error for %o', (input, field) => {
    const res = levelReadingInput.safeParse(input);
    expect(res.success).toBe(false);
    const err = fromZod(res.error!, 'reading');
    expect(err).toMatchObject({ status: 400, code: 'bad_request:reading', field });
    expect(err.message.startsWith(`${field}: `)).toBe(true);
  });

  it('requires a client-made UUID on the command', () => {
    const res = readingSubmit.safeParse({ id: '42', sessionId: crypto.randomUUID(), reading: ok });
    expect(res.success).toBe(false);
    expect(fromZod(res.error!, 'reading').field).toBe('id');
  });
});
