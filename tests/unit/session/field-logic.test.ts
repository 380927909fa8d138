import { evaluate } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { levelReadingInput, sweepReadingInput } from '@/lib/session/commands';
import { readingKey, stagePlan } from '@/lib/session/derive';
import {
  answeredInOutbox,
  fieldError,
  formatTurns,
  heightToMm,
  indicatorToUm,
  keyOfInput,
  moveWords,
  pendingChecks,
  pendingNotes,
  pendingReadings,
  pendingStage,
  placementOf,
  typedNumber,
  type Queued,
} from '@/components/field/field-logic';

const q = (id: string, name: string, payload: Record<string, unknown>, queuedAt: number): Queued => ({ id, name, payload, queuedAt });

describe('what the outbox still holds', () => {
  const outbox = [
    q('r2', 'reading:submit', { reading: { kind: 'level', stage: 'twist', axis: 'x', positionMm: 0, divisions: -0.5 } }, 20),
    q('s1', 'stage:enter', { stage: 'twist' }, 5),
    q('r1', 'reading:submit', { reading: { kind: 'level', stage: 'twist', axis: 'x', positionMm: -250, divisions: 1.5 } }, 10),
    q('c1', 'check:mark', { item: 'table-clean', done: true }, 1),
    q('c2', 'check:mark', { item: 'table-clean', done: false }, 2),
    q('a1', 'move:answer', { moveId: 'm1', outcome: 'done', turns: 0.25 }, 30),
    q('n1', 'note:post', { text: 'pads look dry' }, 40),
  ];

  it('lists queued readings in the order they were typed, whatever order the store returns them in', () => {
    expect(pendingReadings(outbox).map((p) => p.id)).toEqual(['r1', 'r2']);
  });
  it('takes the latest queued stage change as the stage the technician is in', () => {
    expect(pendingStage(outbox)).toBe('twist');
    expect(pendingStage([...outbox, q('s2', 'stage:enter', { stage: 'twist-recheck' }, 50)])).toBe('twist-recheck');
    expect(pendingStage([])).toBeNull();
  });
  it('keeps the last checklist mark per item', () => {
    expect(pendingChecks(outbox).get('table-clean')).toBe(false);
  });
  it('knows which moves already have an answer waiting', () => {
    expect([...answeredInOutbox(outbox)]).toEqual(['m1']);
  });
  it('lists notes waiting to be sent', () => {
    expect(pendingNotes(outbox)).toEqual([{ id: 'n1', text: 'pads look dry' }]);
  });
  it('matches a queued reading to the planned reading it answers', () => {
    const plan = stagePlan('twist', { travelMm: 500, screws: [] });
    const keys = pendingReadings(outbox).map((p) => keyOfInput(p.reading));
    expect(keys).toEqual(['level:x:-250', 'level:x:0']);
    for (const k of keys) expect(plan.map(readingKey)).toContain(k);
  });
});

describe('what the technician types', () => {
  it.each([
    ['', null],
    ['  ', null],
    ['1.5', 1.5],
    ['+2', 2],
    ['-0.5', -0.5],
    ['−0.5', -0.5], // a typographic minus, as some keyboards give
    ['0,5', 0.5], // decimal comma
    ['.5', 0.5],
  ])('reads %j as %s', (text, value) => {
    expect(typedNumber(text)).toBe(value);
  });
  it.each(['abc', '1.2.3', '-', '1e3', '2 div'])('reads %j as not a number, which the shared schema refuses by name', (text) => {
    const n = typedNumber(text);
    expect(Number.isNaN(n)).toBe(true);
    const parsed = levelReadingInput.safeParse({ kind: 'level', axis: 'x', positionMm: 0, divisions: n });
    expect(parsed.success).toBe(false);
    expect(fieldError(parsed.error!).message).toBe('divisions: must be a number');
  });
});

describe('conversions to what the commands carry', () => {
  // 1 in = 25.4 mm exactly (NIST, 1959 international yard and pound agreement); mathjs gives the reference values.
  it.each([
    [3.1496, 'inch'],
    [80, 'metric'],
  ] as const)('height %s typed in the %s system, to mm', (value, system) => {
    const expected = system === 'inch' ? evaluate(`${value} inch to mm`).toNumber('mm') : value;
    expect(heightToMm(value, system)).toBeCloseTo(expected, 9);
  });
  it.each([0.0004, -0.00005, 0.0001])('indicator %s in to µm', (value) => {
    expect(indicatorToUm(value, 'inch')).toBeCloseTo(evaluate(`${value} inch to um`).toNumber('um'), 9);
  });
  it('takes metric indicator values as µm', () => {
    expect(indicatorToUm(12.5, 'metric')).toBe(12.5);
  });
  it('leaves what is not a number for the schema to refuse, naming the form field', () => {
    const parsed = sweepReadingInput.safeParse({ kind: 'sweep', stage: 'spindle-sweep', frontUm: indicatorToUm(Number.NaN, 'inch'), backUm: 0, leftUm: 0, rightUm: 0 });
    expect(parsed.success).toBe(false);
    expect(fieldError(parsed.error!)).toEqual({ field: 'front', message: 'front: must be a number' });
  });
});

describe('a move in the technician’s words', () => {
  // TRADE.md worked example: 0.012 in on a 1-8 UNC screw (0.125 in pitch, ASME B1.1) is 0.096 turn, 34.56° of swing.
  const raiseUm = evaluate('0.012 inch to um').toNumber('um');
  it('raises by turns and degrees, unsigned', () => {
    expect(moveWords({ raiseUm, turns: 0.096, degrees: 34.56 })).toEqual({ direction: 'raise', turns: 0.096, degrees: 34.56, liftUm: raiseUm });
  });
  it('lowers when the move is negative', () => {
    expect(moveWords({ raiseUm: -raiseUm, turns: -0.096, degrees: -34.56 })).toMatchObject({ direction: 'lower', turns: 0.096, degrees: 34.56 });
  });
  it('writes turns with at most three decimals', () => {
    expect(formatTurns(0.096)).toBe('0.096 turns');
    expect(formatTurns(1)).toBe('1 turn');
    expect(formatTurns(0.12345)).toBe('0.123 turns');
  });
});

describe('where the instrument goes on the top view', () => {
  it('puts a level on the centre line at its station, a reversal at the centre, a sweep on its circle', () => {
    expect(placementOf({ kind: 'level', axis: 'y', positionMm: 250, label: '' })).toEqual({ kind: 'bar', axis: 'y', xMm: 0, yMm: 250 });
    expect(placementOf({ kind: 'reversal', axis: 'x', label: '' })).toEqual({ kind: 'bar', axis: 'x', xMm: 0, yMm: 0 });
    // 10 in sweep circle = 254 mm (NIST inch).
    expect(placementOf({ kind: 'sweep', diameterMm: 254, label: '' })).toEqual({ kind: 'circle', xMm: 0, yMm: 0, diameterMm: 254 });
    expect(placementOf({ kind: 'height', screwId: 's1', label: '' })).toEqual({ kind: 'screw', screwId: 's1' });
    expect(placementOf(null)).toBeNull();
  });
});
