import { evaluate, unit } from 'mathjs';
import { describe, expect, it } from 'vitest';
import type { SessionEvent, SessionScrew, SessionTolerances } from '@/lib/session/events';
import { foldEvents } from '@/lib/session/fold';
import { sessionSeries } from '@/lib/session/series';
import type { SessionStage } from '@/lib/session/stages';
import { countRounds, liveSpansOf, summarizeSession, timesOf, type MeasureRow, type SummaryMeasure } from '@/lib/session/summary';
import { simulatedLog } from '../report/simulated-log';

/** A slope as µrad from a ratio mathjs evaluates (rise over run is radians for small angles; TRADE.md §2). */
const urad = (ratio: string) => unit(evaluate(ratio) as number, 'rad').toNumber('urad');
/** A length in inches as µm (1 in = 25.4 mm exactly, NIST). */
const umOfIn = (inches: number) => unit(inches, 'inch').toNumber('um');

const row = (rows: MeasureRow[], m: SummaryMeasure) => rows.find((r) => r.measure === m)!;

/** A hand-made log: each call appends one event with the next seq, a minute apart from 08:00 UTC on 3 March 2026. */
function log(tolerances: SessionTolerances = { levelUrad: 20, twistUrad: 20, bowUrad: 20, sweepTirUm: 12.7 }, travelMm = 500) {
  const events: SessionEvent[] = [];
  const at = (seq: number) => new Date(Date.UTC(2026, 2, 3, 8, seq - 1, 0)).toISOString();
  const add = (type: SessionEvent['type'], payload: object) => {
    const seq = events.length + 1;
    events.push({ sessionId: 's', seq, id: `e${seq}`, type, payload, actorId: 'u', actorRole: 'technician', clientTs: null, serverTs: at(seq), prevHash: '', hash: '' } as SessionEvent);
    return seq;
  };
  const screws: SessionScrew[] = [
    { id: 'fl', label: 'FL', kind: 'corner', xMm: -800, yMm: -400, liftPerTurnMm: 3, specifiedHeightMm: 80 },
    { id: 'fr', label: 'FR', kind: 'corner', xMm: 800, yMm: -400, liftPerTurnMm: 3, specifiedHeightMm: 80 },
    { id: 'rl', label: 'RL', kind: 'corner', xMm: -800, yMm: 400, liftPerTurnMm: 3, specifiedHeightMm: null },
    { id: 'rr', label: 'RR', kind: 'corner', xMm: 800, yMm: 400, liftPerTurnMm: 3, specifiedHeightMm: 80 },
  ];
  add('session:opened', { machineId: 'm', levelDivisionUrad: 20, travelMm, tolerances, screws });
  const level = (stage: SessionStage, axis: 'x' | 'y', positionMm: number, slopeUrad: number) => add('reading:recorded', { kind: 'level', stage, axis, positionMm, divisions: 0, slopeUrad });
  const sweep = (stage: SessionStage, um: { frontUm: number; backUm: number; leftUm: number; rightUm: number }, diameterMm = 254) => add('reading:recorded', { kind: 'sweep', stage, diameterMm, ...um });
  return {
    events,
    at,
    stage: (stage: SessionStage) => add('stage:entered', { stage }),
    level,
    sweep,
    height: (screwId: string, heightMm: number) => add('reading:recorded', { kind: 'height', stage: 'height-check', screwId, heightMm }),
    move: (stage: SessionStage, moveId: string, screwId: string, turns: number, outcome: 'done' | 'cannot' = 'done') => {
      const raiseUm = turns * 3000;
      add('move:sent', { moveId, screwId, stage, raiseUm, turns, degrees: turns * 360, recommended: true });
      return add('move:answered', outcome === 'done' ? { moveId, outcome, turns, raiseUm } : { moveId, outcome, reason: 'seized' });
    },
    /** A full lock-as-left round: X across at 3 stations, Y along at 5, the sweep. */
    asLeft: (x: [number, number, number], y: [number, number, number, number, number], sw: { frontUm: number; backUm: number; leftUm: number; rightUm: number }) => {
      [-250, 0, 250].forEach((p, i) => level('lock-as-left', 'x', p, x[i]!));
      [-250, -125, 0, 125, 250].forEach((p, i) => level('lock-as-left', 'y', p, y[i]!));
      return sweep('lock-as-left', sw);
    },
    end: () => add('session:ended', {}),
    resume: () => add('session:resumed', {}),
    add,
  };
}

describe('summarizeSession on a session played out by the virtual technician (lib/leveling createVirtualMachine)', () => {
  const sim = simulatedLog();
  const summary = summarizeSession(sim.state, timesOf(sim.events));
  const readingsOf = (stage: SessionStage) => sim.events.filter((e) => e.type === 'reading:recorded' && (e.payload as { stage: SessionStage }).stage === stage);

  it('takes as-found from the first point of each measure’s series (the definition shared with the machine history)', () => {
    const series = sessionSeries(sim.state);
    for (const m of ['tiltX', 'tiltY', 'twist', 'bow', 'sweepTir'] as const) {
      const first = series[m].points[0]!;
      expect(row(summary.measures, m).asFound).toMatchObject({ value: first.value, seq: first.seq });
    }
  });

  it('takes as-left from the last lock-as-left round, read straight off its events', () => {
    const lock = readingsOf('lock-as-left').map((e) => e.payload as unknown as Record<string, number | string>);
    // The virtual technician takes one as-left round that passes (it stops there); the last reading per point counts.
    const across = lock.filter((r) => r.kind === 'level' && r.axis === 'x').map((r) => r.slopeUrad as number);
    const along = lock.filter((r) => r.kind === 'level' && r.axis === 'y').map((r) => r.slopeUrad as number);
    const xCentre = lock.filter((r) => r.kind === 'level' && r.axis === 'x' && r.positionMm === 0).at(-1)!.slopeUrad as number;
    const sweepReading = lock.filter((r) => r.kind === 'sweep').at(-1)!;
    const four = ['frontUm', 'backUm', 'leftUm', 'rightUm'].map((k) => sweepReading[k] as number);
    expect(row(summary.measures, 'tiltX').asLeft).toMatchObject({ value: xCentre, source: 'lock-as-left', stage: 'lock-as-left' });
    expect(row(summary.measures, 'twist').asLeft).toMatchObject({ value: expect.closeTo(Math.max(...across) - Math.min(...across), 9), source: 'lock-as-left' });
    expect(row(summary.measures, 'bow').asLeft).toMatchObject({ value: expect.closeTo(Math.max(...along) - Math.min(...along), 9), source: 'lock-as-left' });
    expect(row(summary.measures, 'sweepTir').asLeft).toMatchObject({ value: expect.closeTo(Math.max(...four) - Math.min(...four), 9), source: 'lock-as-left' });
    expect(summary.sweep.asLeft).toMatchObject({ source: 'lock-as-left', frontUm: sweepReading.frontUm, rightUm: sweepReading.rightUm });
  });

  it('passes as-left: the virtual technician stops only once the as-left readings pass', () => {
    expect(sim.state.stage).toBe('lock-as-left');
    expect(summary.asLeftVerdict).toBe('pass');
    for (const r of summary.measures.filter((m) => m.tolerance !== null)) expect(r.asLeft).toMatchObject({ pass: true });
  });

  it('counts one round per batch of moves the coach sent, and totals the turns per screw from the answers', () => {
    const sent = sim.events.filter((e) => e.type === 'move:sent');
    // Each batch of moves goes out in consecutive events; count the runs of consecutive move:sent events.
    const batches = sent.filter((e, i) => i === 0 || sent[i - 1]!.seq !== e.seq - 1).length;
    expect(batches).toBeGreaterThan(0);
    expect(summary.rounds.count).toBe(batches);
    expect(Object.values(summary.rounds.byStage).reduce((a, b) => a + b, 0)).toBe(batches);
    for (const s of summary.moves.byScrew) {
      const ids = new Set(sent.filter((e) => (e.payload as { screwId: string }).screwId === s.screwId).map((e) => (e.payload as { moveId: string }).moveId));
      const answers = sim.events.filter((e) => e.type === 'move:answered' && ids.has((e.payload as { moveId: string }).moveId)).map((e) => e.payload as { turns: number; raiseUm: number });
      expect(s.done).toBe(answers.length);
      expect(s.turns).toBeCloseTo(answers.reduce((t, a) => t + a.turns, 0), 9);
      expect(s.raiseUm).toBeCloseTo(answers.reduce((t, a) => t + a.raiseUm, 0), 6);
    }
    expect(summary.moves).toMatchObject({ sent: sent.length, done: sent.length, cannot: 0, pending: 0 });
  });

  it('times the session from its first to its last event, all of it live (never resumed)', () => {
    const expected = (sim.events.length - 1) * 20_000;
    expect(summary.duration).toMatchObject({ startedAt: sim.events[0]!.serverTs, totalMs: expected, liveMs: expected, liveReason: null });
    // Without the log's facts the state gives the same figures here.
    expect(summarizeSession(sim.state).duration).toMatchObject({ totalMs: expected, liveMs: expected });
  });

  it('reads every screw’s height once: as-found and as-left the same reading, within ±0.5 mm of 80 mm, with the raise done since', () => {
    for (const h of summary.heights) {
      expect(h.asFound).toMatchObject({ pass: true });
      expect(h.asLeft).toEqual(h.asFound);
      expect(h.raisedSinceUm).toBeCloseTo(summary.moves.byScrew.find((m) => m.screwId === h.screwId)!.raiseUm, 6);
    }
  });
});

describe('summarizeSession on hand-made logs', () => {
  it('judges at the boundary: a value equal to its tolerance passes, a hair more fails (common trade practice limits, TRADE.md §5, §6)', () => {
    const limit = urad('0.0002 inch / (10 inch)'); // twist and bow: 20 µrad, common trade practice
    const l = log({ levelUrad: 20, twistUrad: limit, bowUrad: limit, sweepTirUm: umOfIn(0.0005) });
    l.stage('lock-as-left');
    // X across −limit, −20, 0: a twist of exactly the limit; Y along 0 … limit + 1e-6: a bow just over; TIR exactly 0.0005 in.
    l.asLeft([-limit, -20, 0], [0, 5, 10, 15, limit + 1e-6], { frontUm: 0, backUm: umOfIn(0.0005), leftUm: 0, rightUm: 0 });
    const s = summarizeSession(foldEvents(l.events));
    expect(row(s.measures, 'twist').asLeft).toMatchObject({ value: limit, pass: true });
    expect(limit).toBeCloseTo(20, 9);
    expect(row(s.measures, 'bow').asLeft).toMatchObject({ pass: false });
    expect(row(s.measures, 'tiltX').asLeft).toMatchObject({ value: -20, pass: true }); // |−20| ≤ 20: signed measure
    expect(row(s.measures, 'sweepTir').asLeft).toMatchObject({ value: expect.closeTo(12.7, 9), pass: true });
    expect(row(s.measures, 'sweepFrontBack').asLeft).toMatchObject({ value: expect.closeTo(12.7, 9), pass: true });
    expect(s.asLeftVerdict).toBe('fail');
  });

  it('gives the sweep’s components for TRADE.md §6’s example (D = 10 in: left 0, right +0.0004, front +0.00005, back +0.00035 in)', () => {
    const l = log();
    l.stage('lock-as-left');
    l.asLeft([0, 0, 0], [0, 0, 0, 0, 0], { leftUm: 0, rightUm: umOfIn(0.0004), frontUm: umOfIn(0.00005), backUm: umOfIn(0.00035) });
    const s = summarizeSession(foldEvents(l.events));
    // Four-point TIR 0.0004 in; right − left 0.0004 in; back − front 0.0003 in; closure 0 (derived, TRADE.md §6).
    expect(row(s.measures, 'sweepTir').asLeft.value).toBeCloseTo(umOfIn(0.0004), 9);
    expect(row(s.measures, 'sweepLeftRight').asLeft.value).toBeCloseTo(umOfIn(0.0004), 9);
    expect(row(s.measures, 'sweepFrontBack').asLeft.value).toBeCloseTo(umOfIn(0.0003), 9);
    expect(row(s.measures, 'sweepClosure').asLeft).toMatchObject({ value: expect.closeTo(0, 9), pass: null });
    expect(row(s.measures, 'sweepClosure').tolerance).toBeNull();
    // thetaX 40 µrad, thetaY 30 µrad, tilt 50 µrad; full-circle TIR 0.0005 in (TRADE.md §6).
    const asLeft = s.sweep.asLeft;
    if (!('analysis' in asLeft)) throw new Error('no as-left sweep');
    expect(asLeft.analysis.tiltUrad).toBeCloseTo(50, 9);
    expect(asLeft.analysis.fullCircleTirUm).toBeCloseTo(umOfIn(0.0005), 9);
  });

  it('falls back on each measure’s last round without a lock-as-left round, and names what was never measured', () => {
    const l = log();
    l.stage('rough-level');
    l.level('rough-level', 'x', 0, 60);
    l.level('rough-level', 'y', 0, -40);
    l.move('rough-level', 'm1', 'fl', 0.01);
    l.level('rough-level', 'x', 0, 12);
    const lastY = l.level('rough-level', 'y', 0, -8);
    const s = summarizeSession(foldEvents(l.events));
    expect(row(s.measures, 'tiltX')).toMatchObject({ asFound: { value: 60, pass: false }, asLeft: { value: 12, pass: true, source: 'last-round', seq: lastY, stage: 'rough-level' } });
    for (const m of ['twist', 'bow', 'sweepTir', 'sweepLeftRight', 'sweepClosure'] as const) {
      expect(row(s.measures, m).asFound).toEqual({ value: null, reason: expect.stringMatching(/^no completed round/) });
      expect(row(s.measures, m).asLeft.value).toBeNull();
    }
    expect(s.sweep.asFound).toEqual({ value: null, reason: 'no completed round took a spindle sweep' });
    expect(s.asLeftVerdict).toBe('incomplete');
  });

  it('prefers the lock-as-left round to a later round of another stage', () => {
    const l = log();
    l.stage('lock-as-left');
    l.asLeft([1, 2, 3], [0, 1, 2, 3, 4], { frontUm: 0, backUm: 1, leftUm: 0, rightUm: 1 });
    // A later rough-level round (a rework) moves tilt X; as-left stays with the lock-as-left round.
    l.stage('rough-level');
    l.level('rough-level', 'x', 0, 15);
    l.level('rough-level', 'y', 0, 0);
    const s = summarizeSession(foldEvents(l.events));
    expect(row(s.measures, 'tiltX').asLeft).toMatchObject({ value: 2, source: 'lock-as-left' });
    expect(row(s.measures, 'tiltX').asFound).toMatchObject({ value: 2 });
  });

  it('checks heights against the specified height ±0.5 mm (Levelwire’s default, no published source): 80.5 passes, 79.49 fails', () => {
    const l = log();
    l.stage('height-check');
    l.height('fl', 80.5);
    l.height('fr', 79.49);
    l.height('rl', 91);
    l.height('fl', 80.2);
    l.stage('rough-level');
    l.move('rough-level', 'm1', 'fl', 0.02);
    l.move('rough-level', 'm2', 'fl', 0.01, 'cannot');
    const s = summarizeSession(foldEvents(l.events));
    const h = Object.fromEntries(s.heights.map((x) => [x.label, x]));
    expect(h.FL).toMatchObject({ asFound: { heightMm: 80.5, pass: true }, asLeft: { heightMm: 80.2, pass: true }, raisedSinceUm: 60 });
    expect(h.FR!.asFound).toMatchObject({ heightMm: 79.49, deviationMm: expect.closeTo(-0.51, 9), pass: false });
    expect(h.RL!.asFound).toMatchObject({ heightMm: 91, deviationMm: null, pass: null }); // no specified height: not judged
    expect(h.RR!.asFound).toEqual({ value: null, reason: 'no height read at this screw' });
    expect(s.moves.byScrew.find((m) => m.label === 'FL')).toMatchObject({ done: 1, turns: 0.02, raiseUm: 60, cannot: 1, pending: 0 });
  });

  it('counts rounds as runs of done moves closed by a reading or a stage change; a move answered “can’t” is no round', () => {
    const l = log();
    l.stage('rough-level');
    l.level('rough-level', 'x', 0, 60);
    l.move('rough-level', 'a', 'fl', 0.01);
    l.move('rough-level', 'b', 'fr', 0.01); // same round: no reading between
    l.level('rough-level', 'x', 0, 30);
    l.move('rough-level', 'c', 'fl', 0.01); // round 2
    l.move('rough-level', 'd', 'rl', 0.01, 'cannot');
    l.stage('twist');
    l.move('twist', 'e', 'rr', 0.01); // round 3: another stage
    expect(countRounds(foldEvents(l.events))).toEqual({ count: 3, byStage: { 'rough-level': 2, twist: 1 } });
  });

  it('times a resumed session: total from first to last event, live only while live (from the log’s spans)', () => {
    const l = log();
    l.stage('rough-level'); // 08:01
    l.end(); // 08:02 ended
    l.add('review:returned', { reasons: ['retake'] }); // 08:03
    l.resume(); // 08:04 live again
    l.level('rough-level', 'x', 0, 1); // 08:05
    l.end(); // 08:06
    l.add('review:approved', { name: 'R', signature: { width: 10, height: 10, strokes: [[0, 0, 1, 1]] } }); // 08:07
    const state = foldEvents(l.events);
    expect(liveSpansOf(l.events)).toEqual([
      { from: l.at(1), to: l.at(3) },
      { from: l.at(5), to: l.at(7) },
    ]);
    expect(summarizeSession(state, timesOf(l.events)).duration).toMatchObject({ totalMs: 7 * 60_000, liveMs: 4 * 60_000 });
    expect(summarizeSession(state).duration).toMatchObject({ totalMs: 7 * 60_000, liveMs: null, liveReason: expect.stringContaining('resumed') });
  });

  it('judges each instrument’s calibration on the session’s first day (lib/fleet/calibration: due date still usable, expired the day after)', () => {
    const l = log();
    const s = summarizeSession(foldEvents(l.events), {
      instruments: [
        { kind: 'level', model: 'L', serial: 'a', calibratedOn: '2025-03-03', calibrationDue: '2026-03-03' },
        { kind: 'indicator', model: 'I', serial: 'b', calibratedOn: null, calibrationDue: '2026-03-02' },
        { kind: 'level', model: 'L', serial: 'c', calibratedOn: null, calibrationDue: '2026-12-31' },
      ],
    });
    expect(s.instruments.map((i) => [i.serial, i.status, i.judgedOn])).toEqual([
      ['a', 'due-soon', '2026-03-03'],
      ['b', 'expired', '2026-03-03'],
      ['c', 'current', '2026-03-03'],
    ]);
    expect(s.instruments.map((i) => i.certificateLater)).toEqual([false, false, false]);
  });

  it('calls the status at the visit unknown when the certificate on file was issued after the session’s day', () => {
    const l = log();
    const s = summarizeSession(foldEvents(l.events), {
      instruments: [
        { kind: 'level', model: 'L', serial: 'later', calibratedOn: '2026-03-04', calibrationDue: '2027-03-04' },
        { kind: 'level', model: 'L', serial: 'same-day', calibratedOn: '2026-03-03', calibrationDue: '2027-03-03' },
      ],
    });
    expect(s.instruments.map((i) => [i.serial, i.certificateLater])).toEqual([
      ['later', true],
      ['same-day', false],
    ]);
  });

  it('lists the photos with their captions and stages', () => {
    const l = log();
    l.add('photo:attached', { photoId: 'p1', stage: 'prepare', caption: 'Pad under FL', contentType: 'image/jpeg', bytes: 10, key: 'k', thumbKey: 't' });
    const s = summarizeSession(foldEvents(l.events));
    expect(s.photos).toEqual([{ photoId: 'p1', caption: 'Pad under FL', stage: 'prepare', at: l.at(2), contentType: 'image/jpeg', hasThumb: true }]);
  });
});
