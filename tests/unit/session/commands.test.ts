import { describe, expect, it } from 'vitest';
import { fromZod } from '@/lib/errors';
import { levelReadingInput, readingSubmit, reviewApprove, reviewComment, reviewReturn } from '@/lib/session/commands';

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

describe('the review commands', () => {
  const base = { id: crypto.randomUUID(), sessionId: crypto.randomUUID() };
  const signature = { width: 300, height: 100, strokes: [[10, 10, 40, 80, 90, 20]] };

  it('accepts an approval with a typed name and a drawn signature', () => {
    expect(reviewApprove.parse({ ...base, name: '  R. Quill ', signature }).name).toBe('R. Quill');
  });

  it.each([
    [{ ...base, name: '', signature }, 'name'],
    [{ ...base, name: 'R', signature: { ...signature, strokes: [] } }, 'signature.strokes'],
    [{ ...base, name: 'R', signature: { ...signature, strokes: [[1, 2, 3]] } }, 'signature.strokes.0'],
    [{ ...base, name: 'R', signature: { ...signature, strokes: [[1, 2]] } }, 'signature.strokes.0'],
    [{ ...base, name: 'R', signature: { ...signature, strokes: [[1, 2, 301, 50]] } }, 'signature.strokes'],
    [{ ...base, name: 'R', signature: { ...signature, strokes: [[1.5, 2, 3, 4]] } }, 'signature.strokes.0.0'],
    [{ ...base, name: 'R', signature: { ...signature, width: 10 } }, 'signature.width'],
  ])('refuses %o naming %s', (input, field) => {
    const res = reviewApprove.safeParse(input);
    expect(res.success).toBe(false);
    expect(fromZod(res.error!, 'review')).toMatchObject({ status: 400, field });
  });

  it('needs at least one non-empty reason to return a record, and a comment with text at a seq of 0 or more', () => {
    expect(reviewReturn.safeParse({ ...base, reasons: [] }).success).toBe(false);
    expect(fromZod(reviewReturn.safeParse({ ...base, reasons: ['ok', '  '] }).error!, 'review')).toMatchObject({ field: 'reasons.1' });
    expect(reviewReturn.parse({ ...base, reasons: [' redo the sweep '] }).reasons).toEqual(['redo the sweep']);
    expect(fromZod(reviewComment.safeParse({ ...base, atSeq: -1, text: 'x' }).error!, 'review')).toMatchObject({ field: 'atSeq' });
    expect(fromZod(reviewComment.safeParse({ ...base, atSeq: 3, text: '' }).error!, 'review')).toMatchObject({ field: 'text' });
  });
});
