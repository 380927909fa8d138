import { describe, expect, it } from 'vitest';
import { evaluate } from 'mathjs';
import type { SessionEvent, SessionScrew } from '@/lib/session/events';
import { foldEvents } from '@/lib/session/fold';
import { createVirtualMachine, MEASURES, nominalResponse } from '@/lib/leveling';
import { baseModelOf, learnedResponse, recommendedMoves } from '@/lib/session/advice';
import { currentRound, engineScrews, moveOfTurns, stagePlan, stageVerdict, stations } from '@/lib/session/derive';
import { jamItem, padItem } from '@/lib/session/stages';

let seq = 0;
const ev = (type: SessionEvent['type'], payload: object, actorRole = 'technician'): SessionEvent =>
  ({ sessionId: 's', seq: ++seq, id: `e${seq}`, type, payload, actorId: 'u', actorRole, clientTs: null, serverTs: new Date(Date.UTC(2026, 0, 1, 0, 0, seq)).toISOString(), prevHash: '', hash: '' }) as SessionEvent;

const screws: SessionScrew[] = [
  { id: 'fl', label: 'FL', kind: 'corner', xMm: -600, yMm: -400, liftPerTurnMm: 2.5, specifiedHeightMm: 120 },
  { id: 'fr', label: 'FR', kind: 'corner', xMm: 600, yMm: -400, liftPerTurnMm: 2.5, specifiedHeightMm: 120 },
  { id: 'bl', label: 'BL', kind: 'corner', xMm: -600, yMm: 400, liftPerTurnMm: 2.5, specifiedHeightMm: 120 },
  { id: 'br', label: 'BR', kind: 'corner', xMm: 600, yMm: 400, liftPerTurnMm: 2.5, specifiedHeightMm: 120 },
  { id: 'ml', label: 'ML', kind: 'middle', xMm: -600, yMm: 0, liftPerTurnMm: 2.5, specifiedHeightMm: null },
  { id: 'mr', label: 'MR', kind: 'middle', xMm: 600, yMm: 0, liftPerTurnMm: 2.5, specifiedHeightMm: null },
];
/** 0.0002 in per 10 in = 20 µrad (common trade practice for twist and bow; the ratio is SI arithmetic); sweep 0.0005 in = 12.7 µm. */
const tolerances = { levelUrad: 20, twistUrad: 20, bowUrad: 20, sweepTirUm: 12.7 };

function opened() {
  seq = 0;
  return [ev('session:opened', { machineId: 'm', levelDivisionUrad: 20, travelMm: 500, tolerances, screws })];
}
const stage = (s: string) => ev('stage:entered', { stage: s });
const level = (st: string, axis: 'x' | 'y', positionMm: number, slopeUrad: number) =>
  ev('reading:recorded', { kind: 'level', stage: st, axis, positionMm, divisions: slopeUrad / 20, slopeUrad });

describe('stage plans', () => {
  it('asks for the cross slope at the front, middle and back of the Y travel for twist, and five along-Y stations for bow', () => {
    const s = foldEvents(opened());
    expect(stations(500, 3).map((x) => x.positionMm)).toEqual([-250, 0, 250]);
    expect(stagePlan('twist', s).map((p) => p.kind === 'level' && `${p.axis}@${p.positionMm}`)).toEqual(['x@-250', 'x@0', 'x@250', 'y@0']);
    expect(stagePlan('bow', s).map((p) => p.kind === 'level' && p.positionMm)).toEqual([-250, -125, 0, 125, 250]);
    expect(stagePlan('height-check', s)).toHaveLength(6);
  });
});

describe('stage verdicts', () => {
  it('is incomplete until every planned reading and checklist item is in, naming what is missing', () => {
    const s = foldEvents([...opened(), ev('check:marked', { stage: 'prepare', item: 'fixtures-off', done: true })]);
    const v = stageVerdict(s, 'prepare');
    expect(v.status).toBe('incomplete');
    expect(v.detail).toContain('Table and level seat wiped clean, no burrs');
    expect(v.detail).not.toContain('Fixtures, vises and parts off the table');
  });

  it('fails twist when the cross slope changes by more than 20 µrad along the travel, and passes at 20 µrad or less', () => {
    // front −10, back +15 µrad: change 25 µrad > 20 (0.0002 in/10 in) → fail; then a round of 5, 0, 20 → change 20 → pass.
    const base = [...opened(), stage('twist'), level('twist', 'x', -250, -10), level('twist', 'x', 0, 0), level('twist', 'x', 250, 15), level('twist', 'y', 0, 5)];
    const fail = stageVerdict(foldEvents(base), 'twist');
    expect(fail.status).toBe('fail');
    expect(fail.detail.join(' ')).toMatch(/twist 25 µrad/);
    // In inches: 25 µrad = 0.00025 in per 10 in (1 in = 25.4 mm, NIST; a ratio keeps its value in any length unit).
    expect(stageVerdict(foldEvents(base), 'twist', 'inch').detail.join(' ')).toMatch(/twist 0\.00025 in\/10 in over the travel \(limit 0\.00020 in\/10 in\)/);
    const pass = stageVerdict(foldEvents([...base, level('twist', 'x', -250, 5), level('twist', 'x', 250, 20), level('twist', 'x', 0, 10)]), 'twist');
    expect(pass).toEqual({ status: 'pass', detail: [] });
  });

  it('starts a new round after a move is answered done: older readings no longer count', () => {
    const events = [
      ...opened(),
      stage('rough-level'),
      level('rough-level', 'x', 0, 80),
      level('rough-level', 'y', 0, 0),
      ev('move:sent', { moveId: 'm1', screwId: 'fl', stage: 'rough-level', raiseUm: 100, turns: 0.04, degrees: 14.4, recommended: true }, 'expert'),
      ev('move:answered', { moveId: 'm1', outcome: 'done', turns: 0.04, raiseUm: 100 }),
      level('rough-level', 'x', 0, 5),
    ];
    const s = foldEvents(events);
    expect([...currentRound(s, 'rough-level').keys()]).toEqual(['level:x:0']);
    expect(stageVerdict(s, 'rough-level').status).toBe('incomplete');
  });

  it('needs every middle screw snug and every jam nut locked', () => {
    const s = foldEvents([...opened(), ev('check:marked', { stage: 'middles-down', item: padItem('ml'), done: true })]);
    expect(stageVerdict(s, 'middles-down')).toMatchObject({ status: 'incomplete', detail: ['MR snug on its pad'] });
    expect(stageVerdict(s, 'lock-as-left').detail).toContain('FL jam nut locked');
    expect(jamItem('fl')).toBe('jam:fl');
  });

  it('checks heights against the builder’s figure within 0.5 mm (Levelwire’s default)', () => {
    const heights = screws.map((sc, i) => ev('reading:recorded', { kind: 'height', stage: 'height-check', screwId: sc.id, heightMm: i === 0 ? 120.8 : 120.1 }));
    const v = stageVerdict(foldEvents([...opened(), ...heights]), 'height-check');
    expect(v.status).toBe('fail');
    expect(v.detail).toEqual(['FL high by 0.80 mm']);
  });
});

describe('base model and recommended moves', () => {
  it('finds the tilt of a rigid plane from centre readings and recommends raising the low side only', () => {
    const events = [...opened(), stage('rough-level'), level('rough-level', 'x', 0, 100), level('rough-level', 'y', 0, -60)];
    const s = foldEvents(events);
    const model = baseModelOf(s)!;
    expect(model.state.tiltXUrad).toBeCloseTo(100, 0);
    expect(model.state.tiltYUrad).toBeCloseTo(-60, 0);
    const moves = recommendedMoves(s, model);
    expect(moves.length).toBeGreaterThan(0);
    // right side high (+x) and front high (−y): the low corner is back-left; corners only ever raise.
    expect(moves.every((m) => m.raiseUm > 0)).toBe(true);
    expect(moves.map((m) => m.id)).toContain('bl');
    expect(moves.every((m) => ['fl', 'fr', 'bl', 'br'].includes(m.id))).toBe(true);
  });

  it('recommends nothing while a move is pending or once the stage passes', () => {
    const s = foldEvents([
      ...opened(),
      stage('rough-level'),
      level('rough-level', 'x', 0, 100),
      level('rough-level', 'y', 0, 0),
      ev('move:sent', { moveId: 'm1', screwId: 'fl', stage: 'rough-level', raiseUm: 100, turns: 0.04, degrees: 14.4, recommended: true }, 'expert'),
    ]);
    expect(recommendedMoves(s)).toEqual([]);
    const passed = foldEvents([...opened(), stage('rough-level'), level('rough-level', 'x', 0, 10), level('rough-level', 'y', 0, -5)]);
    expect(recommendedMoves(passed)).toEqual([]);
  });

  it('turns a move of 0.3 turn on a 2.5 mm pitch into 750 µm and 108° of swing (checked with mathjs)', () => {
    const m = moveOfTurns(screws[0]!, 0.3);
    expect(m.raiseUm).toBe(evaluate('0.3 * 2.5 mm to um').toNumber('um'));
    expect(m.degrees).toBeCloseTo(evaluate('0.3 * 360'), 9);
  });
});

describe('learning the machine’s response from the session’s own rounds', () => {
  it('after one round, predicts that round’s tilt change closer than the footprint’s nominal response does', () => {
    // A simulated base whose screws lift ±20 % off nominal, with backlash (the engine's virtual machine, seeded).
    const corners = screws.filter((sc) => sc.kind === 'corner');
    const vm = createVirtualMachine({ seed: 7, screws: engineScrews(corners), travelMm: 500, divisionUrad: 20, asFound: { tiltXUrad: 150, tiltYUrad: -90, twistUrad: 0, bowUrad: 0 } });
    seq = 0;
    const events: SessionEvent[] = [ev('session:opened', { machineId: 'm', levelDivisionUrad: 20, travelMm: 500, tolerances, screws: corners }), stage('rough-level')];
    const read = () => (['x', 'y'] as const).map((axis) => level('rough-level', axis, 0, vm.readLevel(axis, 0, 0) * 20));
    events.push(...read());
    const moves = recommendedMoves(foldEvents(events));
    expect(moves.length).toBeGreaterThan(0);
    for (const m of moves) {
      vm.applyMove(m.id, m.raiseUm);
      events.push(ev('move:sent', { moveId: `mv-${m.id}`, screwId: m.id, stage: 'rough-level', raiseUm: m.raiseUm, turns: m.turns, degrees: m.degrees, recommended: true }, 'expert'));
      events.push(ev('move:answered', { moveId: `mv-${m.id}`, outcome: 'done', turns: m.turns, raiseUm: m.raiseUm }));
    }
    events.push(...read());
    const s = foldEvents(events);
    const slope = (axis: 'x' | 'y', i: number) => s.readings.filter((r) => r.kind === 'level' && r.axis === axis)[i]!;
    const observed = [0, 1].map((row) => {
      const axis = row === 0 ? 'x' : 'y';
      return (slope(axis, 1) as { slopeUrad: number }).slopeUrad - (slope(axis, 0) as { slopeUrad: number }).slopeUrad;
    });
    const predict = (response: number[][], row: number) => corners.reduce((sum, sc, j) => sum + response[row]![j]! * (moves.find((m) => m.id === sc.id)?.raiseUm ?? 0), 0);
    const nominal = nominalResponse(engineScrews(corners), 500);
    const learned = learnedResponse(s)!;
    const error = (r: number[][]) => Math.hypot(predict(r, MEASURES.indexOf('tiltXUrad')) - observed[0]!, predict(r, MEASURES.indexOf('tiltYUrad')) - observed[1]!);
    expect(error(nominal)).toBeGreaterThan(5); // the simulated screws do answer differently from nominal
    expect(error(learned)).toBeLessThan(error(nominal) / 2);
  });
});
