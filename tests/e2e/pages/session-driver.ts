// Works a session from its opening to its end over real sockets, as its technician and its expert would: the
// technician ticks each checklist, enters what a virtual machine (the engine's simulator, seeded) reads, answers the
// moves; the expert sends the engine's recommended moves while a stage fails. Used by browser tests and the
// screenshots script to get an ended session with stages, rounds, moves and notes in its log within seconds.
import { randomUUID } from 'node:crypto';
import { io, type Socket } from 'socket.io-client';
import { createVirtualMachine, type VirtualMachine } from '../../../lib/leveling';
import { PROTOCOL_VERSION, SOCKET_PATH, EVENT_TYPES, type ClientToServerEvents, type ServerToClientEvents } from '../../../lib/realtime/contract';
import { recommendedMoves } from '../../../lib/session/advice';
import { adjustStageOf, currentRound, engineScrews, readingKey, stageChecklist, stagePlan, stageVerdict, type PlannedReading } from '../../../lib/session/derive';
import type { SessionEvent } from '../../../lib/session/events';
import { foldEvents, type SessionState } from '../../../lib/session/fold';
import { mergeEvents } from '../../../lib/session/merge';
import { nextStage, type SessionStage } from '../../../lib/session/stages';

type Sock = Socket<ServerToClientEvents, ClientToServerEvents>;

/** A cookie header from a browser context's cookies (Playwright's `context.cookies()`). */
export const cookieHeader = (cookies: { name: string; value: string }[]) => cookies.map((c) => `${c.name}=${c.value}`).join('; ');

async function connect(baseURL: string, cookie: string): Promise<Sock> {
  const socket: Sock = io(baseURL, { path: SOCKET_PATH, auth: { protocol: PROTOCOL_VERSION }, extraHeaders: { cookie }, transports: ['websocket'], reconnection: false, forceNew: true });
  await new Promise<void>((resolve, reject) => {
    socket.once('connect', () => resolve());
    socket.once('connect_error', (e) => reject(e));
  });
  return socket;
}

/** Sends one appending command and waits for its acknowledgement; a refusal throws with the server's message. */
async function command(socket: Sock, name: string, payload: Record<string, unknown>): Promise<number> {
  const ack = (await socket.timeout(15_000).emitWithAck(name as 'note:post', { id: randomUUID(), ...payload } as never)) as { ok: boolean; seq?: number; error?: { message: string } };
  if (!ack.ok) throw new Error(`${name} refused: ${ack.error?.message}`);
  return ack.seq!;
}

/** A planned reading as the technician would enter it off the virtual machine. */
function readingOf(vm: VirtualMachine, state: SessionState, stage: SessionStage, p: PlannedReading): Record<string, unknown> {
  const clampDiv = (d: number) => Math.max(-100, Math.min(100, d));
  switch (p.kind) {
    case 'level':
      return { kind: 'level', stage, axis: p.axis, positionMm: p.positionMm, divisions: clampDiv(vm.readLevel(p.axis, 0, p.positionMm)) };
    case 'reversal': {
      const first = clampDiv(vm.readLevel(p.axis, 0, 0));
      return { kind: 'reversal', stage, axis: p.axis, firstDiv: first, secondDiv: first === 0 ? 0 : -first };
    }
    case 'height': {
      const spec = state.screws.find((s) => s.id === p.screwId)?.specifiedHeightMm ?? 100;
      return { kind: 'height', stage, screwId: p.screwId, heightMm: Math.round((spec + 0.1) * 100) / 100 };
    }
    case 'sweep': {
      const s = vm.readSweep(p.diameterMm);
      return { kind: 'sweep', stage, diameterMm: s.diameterMm, frontUm: s.frontUm, backUm: s.backUm, leftUm: s.leftUm, rightUm: s.rightUm };
    }
  }
}

export type WorkedSession = {
  vm: VirtualMachine;
  state: SessionState;
  /** Rounds of moves the expert sent, per stage. */
  rounds: Partial<Record<SessionStage, number>>;
};

/**
 * Works the session to its end. `tech` and `expert` are cookie headers of its technician and of an expert taking part.
 * A stage that does not pass after `maxRounds` rounds is left anyway; an as-left that does not pass ends with a reason.
 */
export async function workSessionToEnd(opts: { baseURL: string; sessionId: string; tech: string; expert: string; seed: number; maxRounds?: number; notes?: boolean }): Promise<WorkedSession> {
  const { baseURL, sessionId, maxRounds = 8 } = opts;
  const tech = await connect(baseURL, opts.tech);
  const expert = await connect(baseURL, opts.expert);
  let log: SessionEvent[] = [];
  const waiters: { seq: number; resolve: () => void }[] = [];
  const onEvent = (e: SessionEvent) => {
    if (e.sessionId !== sessionId) return;
    log = mergeEvents(log, [e]);
    const last = log.at(-1)?.seq ?? 0;
    for (const w of waiters.splice(0)) if (w.seq <= last) w.resolve();
    else waiters.push(w);
  };
  for (const type of EVENT_TYPES) tech.on(type, onEvent);
  try {
    const joined = await tech.timeout(15_000).emitWithAck('session:join', { sessionId, afterSeq: 0 });
    if (!joined.ok) throw new Error(`join refused: ${joined.error.message}`);
    log = mergeEvents(log, joined.events);
    const expertJoin = await expert.timeout(15_000).emitWithAck('session:join', { sessionId, afterSeq: 0 });
    if (!expertJoin.ok) throw new Error(`expert join refused: ${expertJoin.error.message}`);

    const stored = (seq: number) =>
      new Promise<void>((resolve, reject) => {
        if ((log.at(-1)?.seq ?? 0) >= seq) return resolve();
        const timer = setTimeout(() => reject(new Error(`event #${seq} not seen`)), 15_000);
        waiters.push({ seq, resolve: () => (clearTimeout(timer), resolve()) });
      });
    const send = async (who: Sock, name: string, payload: Record<string, unknown>) => stored(await command(who, name, { sessionId, ...payload }));

    let state = foldEvents(log);
    const vm = createVirtualMachine({ seed: opts.seed, screws: engineScrews(state.screws), travelMm: state.travelMm!, divisionUrad: state.levelDivisionUrad! });
    const rounds: WorkedSession['rounds'] = {};
    for (let guard = 0; guard < 3000; guard++) {
      state = foldEvents(log);
      const stage = state.stage;
      const pending = state.moves.find((m) => m.status === 'pending');
      if (pending) {
        await send(tech, 'move:answer', { moveId: pending.moveId, outcome: 'done', turns: pending.turns });
        vm.applyMove(pending.screwId, pending.raiseUm);
        continue;
      }
      const unchecked = stageChecklist(stage, state.screws).find((c) => !state.checks[c.id]);
      if (unchecked) {
        await send(tech, 'check:mark', { stage, item: unchecked.id, done: true });
        continue;
      }
      const round = currentRound(state, stage);
      const missing = stagePlan(stage, state).find((p) => !round.has(readingKey(p)));
      if (missing) {
        await send(tech, 'reading:submit', { reading: readingOf(vm, state, stage, missing) });
        continue;
      }
      const verdict = stageVerdict(state, stage);
      const next = nextStage(stage);
      const moves = verdict.status === 'fail' && adjustStageOf(stage) && (rounds[stage] ?? 0) < maxRounds ? recommendedMoves(state) : [];
      if (moves.length > 0) {
        rounds[stage] = (rounds[stage] ?? 0) + 1;
        if (opts.notes && rounds[stage] === 1) await send(expert, 'note:post', { text: `${stage}: sending the engine's moves, round 1.` });
        for (const m of moves) await send(expert, 'move:send', { stage, screwId: m.id, turns: m.turns, recommended: true });
        continue;
      }
      if (next) {
        await send(tech, 'stage:enter', { stage: next });
        continue;
      }
      if (opts.notes) await send(tech, 'note:post', { text: 'As-left taken; every jam nut locked.' });
      await send(tech, 'session:end', verdict.status === 'pass' ? {} : { reason: `As-left: ${verdict.detail.join('; ')}` });
      return { vm, state: foldEvents(log), rounds };
    }
    throw new Error('the session did not reach its end within 3000 steps');
  } finally {
    tech.disconnect();
    expert.disconnect();
  }
}
