import { randomUUID } from 'node:crypto';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import type { SessionEvent, SessionTolerances } from '@/lib/session/events';
import { foldEvents, type SessionState } from '@/lib/session/fold';
import { eventHash, verifyChain } from '@/lib/session/hash-chain';
import { asFoundAsLeft, machineHistory, type HistorySessionInput } from '@/lib/session/history';
import type { SessionStage } from '@/lib/session/stages';
import { sessionSeries } from '@/lib/session/series';
import { checkSessionFile, exportFilename, READING_COLUMNS, readingsCsv, sessionFileOf } from '@/lib/session/transfer';

const TOL: SessionTolerances = { levelUrad: 20, twistUrad: 20, bowUrad: 20, sweepTirUm: 12.7 };

/** A session log built by hand with real hashes (eventHash), one second between events from `start`. */
function hashedLog({ start = Date.UTC(2026, 0, 5, 8), screwLabel = 'FL', tolerances = TOL } = {}) {
  const sessionId = randomUUID();
  const actorId = randomUUID();
  const events: SessionEvent[] = [];
  const add = (type: SessionEvent['type'], payload: object, actorRole = 'technician') => {
    const prevHash = events.at(-1)?.hash ?? '';
    const seq = events.length + 1;
    const e = { sessionId, seq, id: randomUUID(), type, payload, actorId, actorRole, clientTs: null, serverTs: new Date(start + seq * 1000).toISOString(), prevHash };
    events.push({ ...e, hash: eventHash(prevHash, e as SessionEvent) } as SessionEvent);
    return seq;
  };
  const screws = [
    { id: randomUUID(), label: screwLabel, kind: 'corner', xMm: -800, yMm: -400, liftPerTurnMm: 3, specifiedHeightMm: null },
    { id: randomUUID(), label: 'FR', kind: 'corner', xMm: 800, yMm: -400, liftPerTurnMm: 3, specifiedHeightMm: null },
    { id: randomUUID(), label: 'RL', kind: 'corner', xMm: -800, yMm: 400, liftPerTurnMm: 3, specifiedHeightMm: null },
    { id: randomUUID(), label: 'RR', kind: 'corner', xMm: 800, yMm: 400, liftPerTurnMm: 3, specifiedHeightMm: null },
  ];
  add('session:opened', { machineId: randomUUID(), levelDivisionUrad: 20, machineLabel: 'Unit VMC · U1', travelMm: 500, tolerances, screws });
  add('participant:added', { userId: actorId, name: 'Unit technician', part: 'technician' });
  return {
    sessionId,
    events,
    screws,
    stage: (stage: SessionStage) => add('stage:entered', { stage }),
    level: (stage: SessionStage, axis: 'x' | 'y', positionMm: number, slopeUrad: number) =>
      add('reading:recorded', { kind: 'level', stage, axis, positionMm, divisions: slopeUrad / 20, slopeUrad }),
    height: (stage: SessionStage, screwId: string, heightMm: number) => add('reading:recorded', { kind: 'height', stage, screwId, heightMm }),
    sweep: (stage: SessionStage, um: { frontUm: number; backUm: number; leftUm: number; rightUm: number }) => add('reading:recorded', { kind: 'sweep', stage, diameterMm: 254, ...um }),
    moveDone: (stage: SessionStage) => {
      const moveId = randomUUID();
      add('move:sent', { moveId, screwId: screws[2]!.id, stage, raiseUm: 30, turns: 0.01, degrees: 3.6, recommended: true }, 'expert');
      return add('move:answered', { moveId, outcome: 'done', turns: 0.01, raiseUm: 30 });
    },
    end: () => add('session:ended', {}),
    approve: () => add('review:approved', { name: 'Unit reviewer', signature: { width: 300, height: 100, strokes: [[1, 2, 30, 40]] } }, 'reviewer'),
  };
}

/** Rough level in two rounds (tilt X 60 → 10 µrad, Y −40 → 5 µrad), then one twist round; ended. */
function twoRoundSession(opts: Parameters<typeof hashedLog>[0] = {}, x = [60, 10]) {
  const l = hashedLog(opts);
  l.stage('rough-level');
  l.level('rough-level', 'x', 0, x[0]!);
  l.level('rough-level', 'y', 0, -40);
  l.moveDone('rough-level');
  l.level('rough-level', 'x', 0, x[1]!);
  l.level('rough-level', 'y', 0, 5);
  l.stage('twist');
  l.level('twist', 'x', -250, 8);
  l.level('twist', 'x', 0, 2);
  l.level('twist', 'x', 250, -4);
  l.level('twist', 'y', 0, 1);
  l.end();
  return l;
}

const input = (l: ReturnType<typeof hashedLog>, extra: Partial<HistorySessionInput> = {}): HistorySessionInput => ({
  id: l.sessionId,
  state: foldEvents(l.events),
  approvedAt: null,
  technicianName: 'Unit technician',
  mayOpen: true,
  ...extra,
});

describe('asFoundAsLeft (as-found = first completed round, as-left = last: Levelwire’s definition, TRADE.md §1 names both records)', () => {
  it('takes the first and the last point of each measure’s series, with pass or fail against the session’s tolerance', () => {
    const ends = asFoundAsLeft(foldEvents(twoRoundSession().events));
    // Tilt at the centre: the rough-level rounds, then the twist round's centre reading (2 µrad X, 1 µrad Y) is the last.
    expect(ends.tiltX.asFound).toMatchObject({ value: 60, within: false, stage: 'rough-level' });
    expect(ends.tiltX.asLeft).toMatchObject({ value: 2, within: true, stage: 'twist' });
    expect(ends.tiltY.asFound?.value).toBe(-40);
    expect(ends.tiltY.asLeft?.value).toBe(1);
    // Twist from one round only: as-found and as-left are the same point, 8 − (−4) = 12 µrad within 20 µrad.
    expect(ends.twist.asFound).toEqual(ends.twist.asLeft);
    expect(ends.twist.asFound?.value).toBeCloseTo(12, 9);
    expect(ends.twist.tolerance).toBe(20);
    expect(ends.bow.asFound).toBeNull();
    expect(ends.sweepTir.asLeft).toBeNull();
    expect(ends.tiltX.asFound!.seq).toBeLessThan(ends.tiltX.asLeft!.seq);
  });
});

describe('asFoundAsLeft after a lock-and-as-left round', () => {
  it('takes the as-left from the last lock-and-as-left round, as the summary does, even when a later round of another stage completes', () => {
    const l = twoRoundSession();
    l.stage('lock-as-left');
    [-250, 0, 250].forEach((p, i) => l.level('lock-as-left', 'x', p, [3, 1, -1][i]!));
    [-250, -125, 0, 125, 250].forEach((p) => l.level('lock-as-left', 'y', p, 2));
    l.sweep('lock-as-left', { frontUm: 1, backUm: 0, leftUm: 0, rightUm: 4 });
    // Rework afterwards: a twist round that completes after the lock round.
    l.stage('twist');
    l.moveDone('twist');
    [-250, 0, 250].forEach((p, i) => l.level('twist', 'x', p, [30, 0, -30][i]!));
    l.level('twist', 'y', 0, 0);
    const ends = asFoundAsLeft(foldEvents(l.events));
    expect(ends.tiltX.asLeft).toMatchObject({ value: 1, stage: 'lock-as-left' });
    expect(ends.twist.asLeft).toMatchObject({ value: 4, stage: 'lock-as-left', within: true }); // 3 − (−1) µrad
    expect(ends.twist.asFound?.value).toBeCloseTo(12, 9);
    // The series' last twist point is the rework round's 60 µrad, not the as-left.
    expect(sessionSeries(foldEvents(l.events)).twist.points.at(-1)?.value).toBe(60);
    // Four-point sweep: TIR is the largest opposite difference, here right − left = 4 µm (TRADE.md §6).
    expect(ends.sweepTir.asLeft).toMatchObject({ value: 4, stage: 'lock-as-left' });
  });
});

describe('machineHistory', () => {
  const machine = { checkIntervalMonths: 9, priorLeveledOn: null };
  const today = '2026-06-01';

  it('orders sessions by opening, skips a live one, and gives one as-found and one as-left point per session in time order', () => {
    const march = twoRoundSession({ start: Date.UTC(2026, 2, 10, 8) }, [30, 4]);
    const january = twoRoundSession({ start: Date.UTC(2026, 0, 5, 8) }, [60, 10]);
    const live = hashedLog({ start: Date.UTC(2026, 4, 1, 8) });
    live.stage('rough-level');
    live.level('rough-level', 'x', 0, 90);
    live.level('rough-level', 'y', 0, 0);
    const h = machineHistory([input(march), input(live), input(january)], machine, { today, soonDays: 14 });
    expect(h.rows.map((r) => r.sessionId)).toEqual([january.sessionId, march.sessionId]);
    expect(h.series.tiltX.asFound.map((p) => [p.sessionId, p.value])).toEqual([
      [january.sessionId, 60],
      [march.sessionId, 30],
    ]);
    expect(h.series.tiltX.asLeft.map((p) => p.value)).toEqual([2, 2]);
    expect(h.series.tiltX.asFound.map((p) => p.within)).toEqual([false, false]);
    expect(h.rows[0]!.status).toBe('ended');
    expect(h.series.twist.tolerance).toBe(20);
  });

  it('marks the approved session, and counts the machine due its interval after the last approval’s UTC day (issue 4’s rule, lib/fleet/due.ts)', () => {
    const a = twoRoundSession({ start: Date.UTC(2026, 0, 5, 8) });
    a.approve();
    const b = twoRoundSession({ start: Date.UTC(2026, 2, 10, 8) });
    const h = machineHistory(
      [input(a, { approvedAt: '2026-01-06T23:30:00.000Z' }), input(b)],
      machine,
      { today, soonDays: 14 },
    );
    expect(h.rows.map((r) => r.status)).toEqual(['approved', 'ended']);
    expect(h.series.tiltY.asFound.map((p) => p.approved)).toEqual([true, false]);
    // 2026-01-06 + 9 months = 2026-10-06: fine on 2026-06-01 with a 14-day warning period.
    expect(h.due).toEqual({ lastLeveledOn: '2026-01-06', nextDueOn: '2026-10-06', status: 'ok' });
    // A paper leveling on record after the approval counts instead.
    expect(machineHistory([input(a, { approvedAt: '2026-01-06T23:30:00.000Z' })], { checkIntervalMonths: 6, priorLeveledOn: '2026-02-01' }, { today: '2026-07-25', soonDays: 14 }).due).toEqual({
      lastLeveledOn: '2026-02-01',
      nextDueOn: '2026-08-01',
      status: 'due-soon',
    });
  });

  it('a machine with no ended session has no rows and is due now', () => {
    const h = machineHistory([], machine, { today, soonDays: 14 });
    expect(h.rows).toEqual([]);
    expect(h.series.sweepTir.asFound).toEqual([]);
    expect(h.due).toEqual({ lastLeveledOn: null, nextDueOn: null, status: 'overdue' });
  });
});

describe('readingsCsv', () => {
  const parse = (csv: string) => Papa.parse<string[]>(csv.trim(), { skipEmptyLines: true }).data;

  it('has a header row and one row per reading, numbers kept as numbers (negative ones unescaped)', () => {
    const l = twoRoundSession();
    const rows = parse(readingsCsv(l.events));
    expect(rows[0]).toEqual([...READING_COLUMNS]);
    const readings = l.events.filter((e) => e.type === 'reading:recorded');
    expect(rows).toHaveLength(readings.length + 1);
    const col = (name: (typeof READING_COLUMNS)[number]) => READING_COLUMNS.indexOf(name);
    expect(rows[2]![col('slope_urad')]).toBe('-40');
    expect(rows[2]![col('divisions')]).toBe('-2');
    expect(rows[2]![col('stage')]).toBe('rough-level');
    expect(rows[1]![col('seq')]).toBe(String(readings[0]!.seq));
  });

  it('escapes text a spreadsheet would run as a formula (OWASP “CSV injection”: =, +, -, @ at the start), also across lines', () => {
    const l = hashedLog({ screwLabel: '=cmd|"/c calc"!A1' });
    l.stage('height-check');
    l.height('height-check', l.screws[0]!.id, 80);
    const multi = hashedLog({ screwLabel: '@SUM(1)\n=cmd' });
    multi.height('height-check', multi.screws[0]!.id, 81);
    const screwCol = READING_COLUMNS.indexOf('screw');
    expect(parse(readingsCsv(l.events))[1]![screwCol]).toBe('\'=cmd|"/c calc"!A1');
    expect(parse(readingsCsv(multi.events))[1]![screwCol]).toBe("'@SUM(1)\n=cmd");
    expect(parse(readingsCsv(l.events))[1]![READING_COLUMNS.indexOf('height_mm')]).toBe('80');
  });
});

describe('exportFilename', () => {
  it('names the serial (made safe), the opening day and the session id prefix', () => {
    expect(exportFilename({ serial: 'SN 42/"x"', openedAt: '2026-03-10T08:00:01.000Z', sessionId: 'abcdef12-0000-4000-8000-000000000000' }, 'csv')).toBe(
      'levelwire-session-SN-42-x-2026-03-10-abcdef12.csv',
    );
  });
});

describe('checkSessionFile', () => {
  const fileOf = (l: ReturnType<typeof hashedLog>) =>
    JSON.parse(JSON.stringify(sessionFileOf({ id: l.sessionId, state: 'ended', machine: { id: randomUUID(), label: null, model: null, serial: null } }, l.events, new Date(0))));

  it('accepts an untouched export: the fold and the chain’s head', () => {
    const l = twoRoundSession();
    const checked = checkSessionFile(fileOf(l));
    expect(checked.ok).toBe(true);
    if (!checked.ok) return;
    expect(checked.head).toEqual({ seq: l.events.length, hash: l.events.at(-1)!.hash });
    expect(checked.state.status).toBe('ended');
    expect((checked.state as SessionState).readings).toHaveLength(8);
  });

  it('names the first changed event: its seq, type and why', () => {
    const l = twoRoundSession();
    const file = fileOf(l);
    const i = file.events.findIndex((e: SessionEvent) => e.type === 'reading:recorded');
    file.events[i].payload.divisions = 1.5;
    const checked = checkSessionFile(file);
    expect(checked.ok).toBe(false);
    if (checked.ok) return;
    expect(checked.problem.brokenEvent).toEqual({ index: i, seq: i + 1, type: 'reading:recorded', reason: 'content does not match its hash' });
    expect(checked.problem.message).toContain(`seq ${i + 1} (reading:recorded)`);
  });

  it('names the gap where an event was deleted, and a repeated seq', () => {
    const l = twoRoundSession();
    const gap = fileOf(l);
    gap.events.splice(3, 1);
    const g = checkSessionFile(gap);
    expect(g.ok || g.problem.brokenEvent).toEqual({ index: 3, seq: 5, type: l.events[4]!.type, reason: 'expected seq 4, found 5' });
    const repeated = fileOf(l);
    repeated.events.splice(4, 0, repeated.events[3]);
    const r = checkSessionFile(repeated);
    expect(r.ok || r.problem.brokenEvent).toEqual({ index: 4, seq: 4, type: l.events[3]!.type, reason: 'expected seq 5, found 4' });
  });

  it('refuses a wrong shape naming the path and the event’s seq', () => {
    const l = twoRoundSession();
    const cases: [(f: ReturnType<typeof fileOf>) => void, string][] = [
      [(f) => (f.format = 'other'), 'format'],
      [(f) => (f.events[3].payload.divisions = 'two'), 'events.3.payload.divisions'],
      [(f) => (f.events[3].type = 'reading:invented'), 'events.3.type'],
      [(f) => (f.events[1].id = f.events[1].id.toUpperCase()), 'events.1.id'],
      [(f) => (f.events[2].serverTs = '2026-01-05T09:00:03+01:00'), 'events.2.serverTs'],
      [(f) => (f.events[2].sessionId = randomUUID()), 'events.2.sessionId'],
      [(f) => (f.events = []), 'events'],
    ];
    for (const [spoil, field] of cases) {
      const file = fileOf(l);
      spoil(file);
      const checked = checkSessionFile(file);
      expect(checked.ok ? 'accepted' : checked.problem.field, field).toBe(field);
    }
    expect(checkSessionFile([fileOf(l)])).toEqual({ ok: false, problem: { field: 'file', message: expect.stringMatching(/^file: not a Levelwire session export/) } });
    const bad = fileOf(l);
    bad.events[3].payload.divisions = 'two';
    const checked = checkSessionFile(bad);
    expect(checked.ok || checked.problem.message).toMatch(/^events\.3\.payload\.divisions \(event seq 4\): must be a number/);
  });

  it('wants the log to begin with session:opened', () => {
    const l = hashedLog();
    // A chain of its own that starts elsewhere: rehash from the second event.
    const rest: SessionEvent[] = [];
    for (const e of l.events.slice(1)) {
      const prevHash = rest.at(-1)?.hash ?? '';
      const moved = { ...e, seq: rest.length + 1, prevHash };
      rest.push({ ...moved, hash: eventHash(prevHash, moved) });
    }
    expect(verifyChain(rest).ok).toBe(true);
    const checked = checkSessionFile({ ...fileOf(l), events: rest });
    expect(checked.ok || checked.problem.field).toBe('events.0.type');
  });
});
