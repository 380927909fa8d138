// The virtual technician of demo sessions, against the real database: driven to as-left by an expert who sends the
// engine's recommended moves, left alone on ordinary sessions, rebuilt after a restart, quiet once the session ends.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listEventsBySession } from '@/db/queries/events';
import { openSession } from '@/db/queries/sessions';
import { ensureVirtualTechnician, openDemoSession } from '@/db/seed';
import type { Actor } from '@/lib/auth/actor';
import { broadcast, sessionJoined } from '@/lib/realtime/bus';
import { recommendedMoves } from '@/lib/session/advice';
import { stageVerdict } from '@/lib/session/derive';
import { foldEvents } from '@/lib/session/fold';
import { verifyChain } from '@/lib/session/hash-chain';
import { endSession, sendMove } from '@/lib/session/service';
import { SESSION_STAGES } from '@/lib/session/stages';
import { startVirtualTechnician, VIRTUAL_TECHNICIAN_NAME, type VirtualTechnician } from '@/lib/session/virtual-technician';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';

const db = testDb();
let org: OrgFixture;
let virtualTech: { id: string; name: string };
let expert: Actor;
let runner: VirtualTechnician;

/** Rounds of moves a demo may take before the test calls it stuck (pickDemoSeed allows 12). */
const MAX_ROUNDS = 12;

const actorOf = (u: OrgFixture['users']['expert']): Actor => ({ id: u.id, name: u.name, role: u.role, organisationId: u.organisationId, unitSystem: 'metric' });
const stateOf = async (sessionId: string) => foldEvents(await listEventsBySession(db, { sessionId }));
const start = () => startVirtualTechnician({ db, answerDelayMs: [0, 0], stepDelayMs: [0, 0], resume: false });

async function openDemo() {
  const opened = await openDemoSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: virtualTech, experts: [org.users.expert.id] });
  opened.events.forEach(broadcast);
  return opened.session.id;
}

/** Sends the engine's recommended moves, as they are, whenever the virtual technician waits; returns the rounds sent. */
async function coach(sessionId: string, until: (rounds: number) => boolean): Promise<number> {
  let rounds = 0;
  for (;;) {
    await runner.idle();
    const state = await stateOf(sessionId);
    if (state.stage === 'lock-as-left' && stageVerdict(state, 'lock-as-left').status === 'pass') return rounds;
    if (until(rounds)) return rounds;
    const moves = recommendedMoves(state);
    if (moves.length === 0) throw new Error(`stuck in ${state.stage}: ${stageVerdict(state, state.stage).detail.join('; ')}`);
    if (rounds >= MAX_ROUNDS) throw new Error(`more than ${MAX_ROUNDS} rounds; still in ${state.stage}`);
    rounds++;
    for (const m of moves) {
      await sendMove(db, expert, { id: randomUUID(), sessionId, stage: state.stage, screwId: m.id, turns: m.turns, recommended: true });
    }
  }
}

beforeAll(async () => {
  org = await makeOrganisation(db, 'Virtual');
  const user = await ensureVirtualTechnician(db, { organisationId: org.organisationId, email: `virtual-technician-${randomUUID().slice(0, 8)}@fixture.test` });
  virtualTech = { id: user.id, name: user.name };
  expert = actorOf(org.users.expert);
  runner = start();
});
afterAll(() => runner.stop());

describe('the virtual technician', () => {
  it('is a technician named as the demo’s virtual technician', async () => {
    const user = await ensureVirtualTechnician(db, { organisationId: org.organisationId, email: `virtual-technician-${randomUUID().slice(0, 8)}@fixture.test` });
    expect(user).toMatchObject({ role: 'technician', name: VIRTUAL_TECHNICIAN_NAME, active: true });
  });

  it('walks a demo session from prepare to as-left with the engine’s moves, rebuilt once mid-way after a restart', async () => {
    const sessionId = await openDemo();
    // Two rounds with the first runner, then a "restart": a new runner rebuilds the machine from the log alone.
    const before = await coach(sessionId, (rounds) => rounds >= 2);
    await runner.stop();
    runner = start();
    runner.kick(sessionId);
    const after = await coach(sessionId, () => false);
    expect(before + after).toBeLessThanOrEqual(MAX_ROUNDS);

    const events = await listEventsBySession(db, { sessionId });
    expect(verifyChain(events)).toMatchObject({ ok: true, count: events.length });
    const state = foldEvents(events);
    // Every stage was entered, in the guided order, once each.
    expect(state.stageLog.map((s) => s.stage)).toEqual([...SESSION_STAGES]);
    for (const stage of SESSION_STAGES) expect({ stage, ...stageVerdict(state, stage) }).toEqual({ stage, status: 'pass', detail: [] });
    // Every move was answered done, once, by the virtual technician; it never sent moves itself.
    expect(state.moves.length).toBeGreaterThan(0);
    expect(state.moves.every((m) => m.status === 'done' && m.doneTurns === m.turns)).toBe(true);
    expect(events.filter((e) => e.type === 'move:answered')).toHaveLength(state.moves.length);
    const byVirtual = events.filter((e) => e.actorId === virtualTech.id && e.type !== 'session:opened' && e.type !== 'participant:added');
    expect(new Set(byVirtual.map((e) => e.type))).toEqual(new Set(['check:marked', 'reading:recorded', 'stage:entered', 'move:answered', 'note:posted']));
    // Jam nuts locked (all screws) and the prepare list ticked.
    expect(Object.entries(state.checks).filter(([k, v]) => k.startsWith('jam:') && v)).toHaveLength(state.screws.length);
    await endSession(db, expert, { id: randomUUID(), sessionId });
  });

  it('never acts on an ordinary session', async () => {
    const { session, events } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id] });
    events.forEach(broadcast);
    await runner.idle();
    expect(await listEventsBySession(db, { sessionId: session.id })).toHaveLength(events.length);
  });

  it('answers a move once even when two runners (two processes) work the same session', async () => {
    const sessionId = await openDemo();
    const second = start();
    try {
      second.kick(sessionId);
      await Promise.all([runner.idle(), second.idle()]);
      const state = await stateOf(sessionId);
      const moves = recommendedMoves(state);
      expect(moves.length).toBeGreaterThan(0);
      for (const m of moves) await sendMove(db, expert, { id: randomUUID(), sessionId, stage: state.stage, screwId: m.id, turns: m.turns, recommended: true });
      second.kick(sessionId);
      await Promise.all([runner.idle(), second.idle()]);
      const events = await listEventsBySession(db, { sessionId });
      const answers = events.filter((e) => e.type === 'move:answered').map((e) => (e.payload as { moveId: string }).moveId);
      expect(answers.sort()).toEqual(foldEvents(events).moves.map((m) => m.moveId).sort());
      // Each reading of the stage's retaken round is stored once.
      const after = foldEvents(events);
      const lastAnswer = Math.max(...after.moves.map((m) => m.answeredSeq ?? 0));
      const retaken = after.readings.filter((r) => r.seq > lastAnswer && r.stage === after.stage).map((r) => (r.kind === 'level' ? `${r.axis}:${r.positionMm}` : r.kind));
      expect(new Set(retaken).size).toBe(retaken.length);
      expect(verifyChain(events).ok).toBe(true);
      await endSession(db, expert, { id: randomUUID(), sessionId });
    } finally {
      await second.stop();
    }
  });

  it('stops when the session ends', async () => {
    const sessionId = await openDemo();
    await runner.idle();
    const state = await stateOf(sessionId);
    const moves = recommendedMoves(state);
    expect(moves.length).toBeGreaterThan(0);
    await endSession(db, expert, { id: randomUUID(), sessionId });
    await runner.idle();
    const count = (await listEventsBySession(db, { sessionId })).length;
    runner.kick(sessionId);
    await runner.idle();
    expect(await listEventsBySession(db, { sessionId })).toHaveLength(count);
  });

  it('given a way to see who is watching, works only while someone watches, and wakes when someone joins', async () => {
    await runner.stop(); // the shared runner would work every demo; this one alone decides here
    let watched = false;
    const watchedRunner = startVirtualTechnician({ db, answerDelayMs: [0, 0], stepDelayMs: [0, 0], resume: false, isWatched: async () => watched });
    try {
      const sessionId = await openDemo();
      await watchedRunner.idle();
      const opened = (await listEventsBySession(db, { sessionId })).length;
      expect((await stateOf(sessionId)).stage).toBe('prepare');
      watched = true;
      sessionJoined(sessionId, expert.id);
      await watchedRunner.idle();
      const state = await stateOf(sessionId);
      expect(state.seq).toBeGreaterThan(opened);
      expect(state.stage).not.toBe('prepare');
      await endSession(db, expert, { id: randomUUID(), sessionId });
    } finally {
      await watchedRunner.stop();
    }
  });
});

