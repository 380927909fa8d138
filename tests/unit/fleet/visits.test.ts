import { describe, expect, it } from 'vitest';
import { AppError } from '@/lib/errors';
import { assertVisitTransition, canMoveVisit, scheduleVisitInput, timeInWords, updateVisitInput, VISIT_STATES, visitNotice } from '@/lib/fleet/visits';

describe('visit state moves', () => {
  const allowed = new Set(['scheduled>in_progress', 'scheduled>cancelled', 'in_progress>completed', 'in_progress>cancelled']);
  for (const from of VISIT_STATES) {
    for (const to of VISIT_STATES) {
      const ok = allowed.has(`${from}>${to}`);
      it(`${from} → ${to} is ${ok ? 'allowed' : 'refused with a 409 naming both states'}`, () => {
        expect(canMoveVisit(from, to)).toBe(ok);
        if (ok) expect(() => assertVisitTransition(from, to)).not.toThrow();
        else {
          const err = (() => {
            try {
              assertVisitTransition(from, to);
            } catch (e) {
              return e as AppError;
            }
          })();
          expect(err).toBeInstanceOf(AppError);
          expect(err!.status).toBe(409);
          expect(err!.message).toContain(`${from} → ${to}`);
        }
      });
    }
  }
});

describe('timeInWords', () => {
  // Weekdays checked against the Gregorian calendar: 1 January 2030 is a Tuesday; 29 February 2028 a Tuesday.
  it.each([
    ['2030-01-01T09:05:00Z', 'Tuesday 1 January 2030, 09:05 UTC'],
    ['2028-02-29T23:59:00Z', 'Tuesday 29 February 2028, 23:59 UTC'],
    ['2026-12-07T08:30:00+02:00', 'Monday 7 December 2026, 06:30 UTC'],
  ])('%s reads %s', (iso, words) => expect(timeInWords(new Date(iso))).toBe(words));
});

describe('visitNotice', () => {
  const v = {
    scheduledFor: new Date('2030-01-01T09:05:00Z'),
    notes: 'Bring the long straightedge.',
    machine: { model: 'VX-800', serial: 'S-1' },
    site: { name: 'Hall 2', address: '4 Quarry Lane', accessNotes: 'Gate code at reception' },
    customerName: 'Invented Works',
    technicianName: 'Tess',
    expertName: null,
  };
  it('is plain text with machine, site, address, the time in UTC ISO and in words', () => {
    const { subject, text } = visitNotice(v, 'scheduled');
    expect(subject).toBe('Leveling visit scheduled: VX-800 S-1, Tuesday 1 January 2030, 09:05 UTC');
    for (const part of ['VX-800, serial S-1', 'Hall 2', '4 Quarry Lane', '2030-01-01T09:05:00.000Z', 'Tuesday 1 January 2030, 09:05 UTC', '(none assigned)', 'Gate code', 'long straightedge']) {
      expect(text).toContain(part);
    }
    expect(text).not.toMatch(/<[a-z]/i);
  });
  it('words a reminder and a move differently', () => {
    expect(visitNotice(v, 'reminder').subject).toMatch(/^Reminder: /);
    expect(visitNotice(v, 'rescheduled').text).toMatch(/^A leveling visit has been moved/);
  });
});

describe('visit input schemas', () => {
  const base = { machineId: crypto.randomUUID(), technicianId: crypto.randomUUID(), scheduledFor: new Date(Date.now() + 86_400_000).toISOString() };
  it('accepts a visit in the future with or without an expert and notes', () => {
    expect(scheduleVisitInput.parse(base)).toMatchObject({ notes: '' });
    expect(scheduleVisitInput.parse({ ...base, expertId: null, notes: ' x ' }).notes).toBe('x');
  });
  it('names the field at fault', () => {
    const r = scheduleVisitInput.safeParse({ ...base, scheduledFor: '2000-01-01T00:00:00Z' });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]!.path).toEqual(['scheduledFor']);
  });
  it('wants at least one change in an update', () => {
    expect(updateVisitInput.safeParse({}).success).toBe(false);
    expect(updateVisitInput.safeParse({ state: 'cancelled' }).success).toBe(true);
  });
});
