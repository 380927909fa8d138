/**
 * The virtual technician of demo sessions: a session whose `virtualSeed` is set is worked by the engine's simulated
 * machine. It walks the stages through the same service functions a person's commands go through, as the session's
 * (seeded) technician, and waits for the coach's moves whenever a stage fails. Decisions are read off the folded
 * log, one queue per session, and every command id is derived from the log position it answers, so an event is
 * never acted on twice (a second decision at the same point stores nothing).
 */
import { createHash } from 'node:crypto';
import type { Db } from '@/db/client';
import { listEventsBySession } from '@/db/queries/events';
import { getSessionRunner, listLiveDemoSessionIds } from '@/db/queries/sessions';
import { actorFromUserId, type Actor } from '@/lib/auth/actor';
import { AppError } from '@/lib/errors';
import { createVirtualMachine, readingToSlopeUrad, reversalCheck, seededRandom, type VirtualMachine } from '@/lib/leveling';
import { onSessionJoined, onStoredEvent } from '@/lib/realtime/bus';
import type { ReadingSubmit } from './commands';
import {
  adjustStageOf,
  currentRound,
  engineScrews,
  moveOfTurns,
  readingKey,
  stageChecklist,
  stagePlan,
  stageVerdict,
  type PlannedReading,
} from './derive';
import { recommendedMoves } from './advice';
import type { EventType, PayloadOf, ReadingPayload, SessionEvent, SessionOpenedPayload } from './events';
import { foldEvents, initialState, type SessionState } from './fold';
import { answerMove, enterStage, markCheck, postNote, recordReading } from './service';
import { nextStage, type SessionStage } from './stages';

/** The virtual technician's name as seeded (role technician, a random password nobody knows). */
export const VIRTUAL_TECHNICIAN_NAME = 'Virtual technician (demo)';

/** What the virtual technician does next. Reading values are taken from the machine only when the reading is made. */
export type VirtualAction =
  | { kind: 'answer'; moveId: string; turns: number }
  | { kind: 'check'; stage: SessionStage; item: string }
  | { kind: 'reading'; stage: SessionStage; planned: PlannedReading }
  | { kind: 'stage'; stage: SessionStage }
  | { kind: 'note'; text: string };

/** The simulated machine of one demo session and the done moves already applied to it. */
export type VirtualRig = { seed: number; machine: VirtualMachine; applied: Set<string> };

type ReadingCommand = ReadingSubmit['reading'];

/** A fresh machine from the session's seed and footprint (null for a session that is not a demo, or has no footprint). */
export function rigFor(state: SessionState): VirtualRig | null {
  if (state.virtualSeed === null || state.screws.length < 3) return null;
  const machine = createVirtualMachine({
    seed: state.virtualSeed,
    screws: engineScrews(state.screws),
    travelMm: state.travelMm ?? 500,
    divisionUrad: state.levelDivisionUrad ?? 20,
  });
  return { seed: state.virtualSeed, machine, applied: new Set() };
}

/**
 * Applies every move the log shows answered done, and not yet applied, to the machine in the order they were done:
 * the same call keeps a running machine in step and rebuilds one after a restart from the log alone.
 */
export function syncRig(rig: VirtualRig, state: SessionState): void {
  const done = state.moves.filter((m) => m.status === 'done' && m.doneRaiseUm !== null && !rig.applied.has(m.moveId));
  for (const m of done.sort((a, b) => (a.answeredSeq ?? 0) - (b.answeredSeq ?? 0))) {
    rig.machine.applyMove(m.screwId, m.doneRaiseUm!);
    rig.applied.add(m.moveId);
  }
}

const AS_LEFT_DONE = 'As-left readings taken and within tolerance; every jam nut is locked. End the session when you have looked over the figures.';

/**
 * The next thing a technician would do in this state: answer a pending move (done, as sent), tick the stage's
 * checklist, take the stage's next missing reading, enter the next stage once the stage passes. Null while the
 * stage fails and the coach has sent no moves, and once the session is ended or the as-left readings pass.
 */
export function nextVirtualAction(state: SessionState): VirtualAction | null {
  if (state.ended || state.virtualSeed === null) return null;
  const pending = state.moves.find((m) => m.status === 'pending');
  if (pending) return { kind: 'answer', moveId: pending.moveId, turns: pending.turns };

  const stage = state.stage;
  const unchecked = stageChecklist(stage, state.screws).find((c) => !state.checks[c.id]);
  if (unchecked) return { kind: 'check', stage, item: unchecked.id };

  const round = currentRound(state, stage);
  const missing = stagePlan(stage, state).find((p) => !round.has(readingKey(p)));
  if (missing) return { kind: 'reading', stage, planned: missing };

  const verdict = stageVerdict(state, stage);
  if (verdict.status === 'pass') {
    const next = nextStage(stage);
    if (next) return { kind: 'stage', stage: next };
    return state.notes.some((n) => n.text === AS_LEFT_DONE) ? null : { kind: 'note', text: AS_LEFT_DONE };
  }
  if (verdict.status === 'fail' && !adjustStageOf(stage)) {
    // No moves are recommended here (as-left): say what is out once per round, then wait for moves.
    const lastSeq = Math.max(0, ...[...round.values()].map((r) => r.seq));
    const text = `Readings of round ending #${lastSeq} are out of tolerance: ${verdict.detail.join('; ')}. Waiting for your moves.`;
    return state.notes.some((n) => n.text === text) ? null : { kind: 'note', text };
  }
  return null;
}

/** A height the virtual machine shows at a screw: the specified height within ±0.2 mm, fixed per seed and screw. */
function heightAtMm(rig: VirtualRig, state: SessionState, screwId: string): number {
  const screw = state.screws.find((s) => s.id === screwId);
  const digest = createHash('sha1').update(`${rig.seed}:${screwId}`).digest();
  const offset = (seededRandom(digest.readUInt32BE(0))() - 0.5) * 0.4;
  return Math.round(((screw?.specifiedHeightMm ?? 100) + offset) * 100) / 100;
}

const clampDiv = (div: number) => Math.max(-100, Math.min(100, div));

/** Takes a planned reading from the machine, as the technician would enter it. */
export function takeReading(rig: VirtualRig, state: SessionState, stage: SessionStage, planned: PlannedReading): ReadingCommand {
  switch (planned.kind) {
    case 'level':
      return { kind: 'level', stage, axis: planned.axis, positionMm: planned.positionMm, divisions: clampDiv(rig.machine.readLevel(planned.axis, 0, planned.positionMm)) };
    case 'reversal': {
      // The virtual level has no zero error: turned end for end it reads the same slope with the sign reversed.
      const firstDiv = clampDiv(rig.machine.readLevel(planned.axis, 0, 0));
      return { kind: 'reversal', stage, axis: planned.axis, firstDiv, secondDiv: firstDiv === 0 ? 0 : -firstDiv };
    }
    case 'height':
      return { kind: 'height', stage, screwId: planned.screwId, heightMm: heightAtMm(rig, state, planned.screwId) };
    case 'sweep': {
      const s = rig.machine.readSweep(planned.diameterMm);
      return { kind: 'sweep', stage, diameterMm: s.diameterMm, frontUm: s.frontUm, backUm: s.backUm, leftUm: s.leftUm, rightUm: s.rightUm };
    }
  }
}

/** A name-based UUID (RFC 9562 version 5 layout, SHA-1): the same name always gives the same id. */
export function nameUuid(name: string): string {
  const h = createHash('sha1').update('levelwire.virtual-technician:').update(name).digest();
  h[6] = (h[6]! & 0x0f) | 0x50;
  h[8] = (h[8]! & 0x3f) | 0x80;
  const hex = h.subarray(0, 16).toString('hex');
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}

/** What an action is about, without the log position: a decision repeated after a pause is the same action. */
export function actionKey(a: VirtualAction): string {
  switch (a.kind) {
    case 'answer':
      return `answer:${a.moveId}`;
    case 'check':
      return `check:${a.stage}:${a.item}`;
    case 'reading':
      return `reading:${a.stage}:${readingKey(a.planned)}`;
    case 'stage':
      return `stage:${a.stage}`;
    case 'note':
      return `note:${a.text}`;
  }
}

/** The command id of an action decided at `seq`: two deciders at the same point of the log store it once. */
export function commandIdOf(sessionId: string, seq: number, a: VirtualAction): string {
  return nameUuid(a.kind === 'note' ? `${sessionId}:${actionKey(a)}` : `${sessionId}:${seq}:${actionKey(a)}`);
}

// ---------------------------------------------------------------------------------------------------------------
// A demo played out in memory: the virtual technician's decisions against a coach who sends the engine's moves.
// The seed uses it to pick a virtual seed the engine can bring to tolerance; tests use it to check the decisions.

export type DemoMachine = Pick<SessionOpenedPayload, 'travelMm' | 'tolerances' | 'screws'> & { levelDivisionUrad: number };

/** In-memory log for the simulation: the payloads the session service would store for the same commands. */
function memoryLog(opened: SessionOpenedPayload) {
  const events: SessionEvent[] = [];
  let state: SessionState = initialState;
  const append = <T extends EventType>(type: T, payload: PayloadOf<T>, actorRole: string, id: string) => {
    const e = { sessionId: 'simulation', seq: events.length + 1, id, type, payload, actorId: actorRole, actorRole, clientTs: null, serverTs: new Date(0).toISOString(), prevHash: '', hash: '' } as SessionEvent;
    events.push(e);
    state = foldEvents([e], state);
  };
  append('session:opened', opened, 'technician', nameUuid('opened'));
  return { events, get state() { return state; }, append };
}

function payloadOfReading(r: ReadingCommand, levelDivisionUrad: number): ReadingPayload {
  if (r.kind === 'level') return { ...r, slopeUrad: readingToSlopeUrad(r.divisions, levelDivisionUrad) };
  if (r.kind === 'reversal') return { ...r, ...reversalCheck(r.firstDiv, r.secondDiv) };
  return r;
}

export type DemoRun = {
  /** Rounds of moves the coach sent (each round: the engine's recommended moves of the moment). */
  rounds: number;
  /** The session reached lock-and-as-left and its as-left readings pass. */
  reachedAsLeft: boolean;
  stage: SessionStage;
  /** Stages entered, in order. */
  stages: SessionStage[];
  /** What the last stage still lacks or has out of tolerance (empty when it passes). */
  detail: string[];
  events: number;
  /** The log as played (actorId holds the actor's part; ids derive from the position; times are zero). */
  log: SessionEvent[];
};

/** Plays a demo session in memory with `seed`, the coach sending every round of recommended moves as they are. */
export function simulateDemo(machine: DemoMachine, seed: number, { maxRounds = 30, maxEvents = 2_000 } = {}): DemoRun {
  const opened: SessionOpenedPayload = { machineId: 'simulation', levelDivisionUrad: machine.levelDivisionUrad, travelMm: machine.travelMm, tolerances: machine.tolerances, screws: machine.screws, virtualSeed: seed };
  const log = memoryLog(opened);
  const rig = rigFor(log.state);
  if (!rig) throw new Error('simulateDemo: the machine needs at least three screws');
  let rounds = 0;
  while (log.events.length < maxEvents) {
    const state = log.state;
    syncRig(rig, state);
    const action = nextVirtualAction(state);
    if (!action) {
      const moves = recommendedMoves(state);
      if (moves.length === 0 || rounds >= maxRounds) break;
      rounds++;
      for (const m of moves) {
        const screw = state.screws.find((s) => s.id === m.id)!;
        const move = moveOfTurns(screw, m.turns);
        const id = nameUuid(`move:${log.events.length}:${m.id}`);
        log.append('move:sent', { moveId: id, screwId: m.id, stage: state.stage, raiseUm: move.raiseUm, turns: move.turns, degrees: move.degrees, recommended: true }, 'expert', id);
      }
      continue;
    }
    const id = commandIdOf('simulation', state.seq, action);
    switch (action.kind) {
      case 'answer': {
        const move = state.moves.find((m) => m.moveId === action.moveId)!;
        const raiseUm = moveOfTurns(state.screws.find((s) => s.id === move.screwId)!, action.turns).raiseUm;
        log.append('move:answered', { moveId: action.moveId, outcome: 'done', turns: action.turns, raiseUm }, 'technician', id);
        break;
      }
      case 'check':
        log.append('check:marked', { stage: action.stage, item: action.item, done: true }, 'technician', id);
        break;
      case 'reading':
        log.append('reading:recorded', payloadOfReading(takeReading(rig, state, action.stage, action.planned), machine.levelDivisionUrad), 'technician', id);
        break;
      case 'stage':
        log.append('stage:entered', { stage: action.stage }, 'technician', id);
        break;
      case 'note':
        log.append('note:posted', { text: action.text }, 'technician', id);
        break;
    }
  }
  const end = log.state;
  const verdict = stageVerdict(end, end.stage);
  return {
    rounds,
    reachedAsLeft: end.stage === 'lock-as-left' && verdict.status === 'pass',
    detail: verdict.detail,
    stage: end.stage,
    stages: end.stageLog.map((s) => s.stage),
    events: log.events.length,
    log: log.events,
  };
}

/**
 * The first virtual seed from `first` whose demo the engine's moves bring to as-left within `maxRounds` rounds: a
 * demo a newcomer can finish (a four-screw base, for one, has no middle screws to take out bow that is drawn too large).
 */
export function pickDemoSeed(machine: DemoMachine, { first = 1, tries = 200, maxRounds = 12 } = {}): number {
  for (let seed = first; seed < first + tries; seed++) {
    const run = simulateDemo(machine, seed, { maxRounds });
    if (run.reachedAsLeft && run.rounds <= maxRounds) return seed;
  }
  throw new Error(`no virtual seed in ${first}..${first + tries - 1} reaches as-left within ${maxRounds} rounds on this machine`);
}

// ---------------------------------------------------------------------------------------------------------------
// The runner in the server process.

export type VirtualTechnicianOptions = {
  db: Db;
  /** Pause before answering a move, ms, drawn between the two (a person reads it and turns the wrench). 0 in tests. */
  answerDelayMs?: readonly [number, number];
  /** Pause before each reading, tick or stage change, ms (so a coach sees readings arrive one by one). */
  stepDelayMs?: readonly [number, number];
  log?: (message: string, err?: unknown) => void;
  /** Pick up the live demo sessions already in the database (default true; tests that share a database turn it off). */
  resume?: boolean;
  /**
   * Whether someone besides the virtual technician is watching the session. When given, it works only while
   * someone watches (a newcomer who opens the demo sees it from where it stands, not finished without them) and
   * wakes when someone joins. Answers to moves are made regardless.
   */
  isWatched?: (sessionId: string, technicianId: string) => Promise<boolean>;
};

type Worker = { running: boolean; again: boolean; done: Promise<void>; actor?: Actor; rig?: VirtualRig };

/**
 * Starts the virtual technician: it listens to every stored event of this process and works the demo sessions among
 * them, and picks up live demo sessions left from before a restart. `stop()` ends it; `idle()` resolves when no
 * session has work queued (tests wait on it).
 */
export function startVirtualTechnician(options: VirtualTechnicianOptions) {
  const { db } = options;
  const answerDelay = options.answerDelayMs ?? [1000, 2000];
  const stepDelay = options.stepDelayMs ?? [500, 1000];
  const log = options.log ?? ((message: string, err?: unknown) => console.error(`[levelwire] virtual technician: ${message}`, err ?? ''));
  const workers = new Map<string, Worker>();
  /** Sessions that are not demos, or have ended: never acted on again. */
  const ignored = new Set<string>();
  const sleepers = new Set<() => void>();
  let stopped = false;

  const sleep = (ms: number) =>
    new Promise<void>((resolve) => {
      const wake = () => {
        clearTimeout(timer);
        sleepers.delete(wake);
        resolve();
      };
      const timer = setTimeout(wake, ms);
      sleepers.add(wake);
    });
  const between = ([low, high]: readonly [number, number]) => low + Math.random() * (high - low);

  const drop = (sessionId: string) => {
    ignored.add(sessionId);
    if (ignored.size > 10_000) ignored.clear();
  };

  async function load(sessionId: string): Promise<SessionState> {
    return foldEvents(await listEventsBySession(db, { sessionId }));
  }

  async function perform(sessionId: string, actor: Actor, rig: VirtualRig, state: SessionState, action: VirtualAction) {
    const base = { id: commandIdOf(sessionId, state.seq, action), sessionId };
    switch (action.kind) {
      case 'answer':
        return answerMove(db, actor, { ...base, moveId: action.moveId, outcome: 'done', turns: action.turns });
      case 'check':
        return markCheck(db, actor, { ...base, stage: action.stage, item: action.item, done: true });
      case 'reading':
        return recordReading(db, actor, { ...base, reading: takeReading(rig, state, action.stage, action.planned) });
      case 'stage':
        return enterStage(db, actor, { ...base, stage: action.stage });
      case 'note':
        return postNote(db, actor, { ...base, text: action.text });
    }
  }

  /** One action for a session, after a human-like pause; the pause is taken again if the decision changed meanwhile. */
  async function step(sessionId: string, w: Worker): Promise<void> {
    if (!w.actor) {
      const row = await getSessionRunner(db, sessionId);
      if (!row || row.virtualSeed === null || row.state !== 'live') return drop(sessionId);
      const actor = await actorFromUserId(db, row.technicianId);
      if (!actor || actor.role !== 'technician') {
        log(`session ${sessionId}: its technician is not an active technician; leaving it alone`);
        return drop(sessionId);
      }
      w.actor = actor;
    }
    let waitedFor: string | null = null;
    while (!stopped) {
      const state = await load(sessionId);
      if (state.ended || state.virtualSeed === null) return drop(sessionId);
      w.rig ??= rigFor(state) ?? undefined;
      if (!w.rig) return drop(sessionId);
      syncRig(w.rig, state);
      const action = nextVirtualAction(state);
      if (!action) return;
      if (action.kind !== 'answer' && options.isWatched && !(await options.isWatched(sessionId, w.actor.id))) return; // a join wakes it
      const key = actionKey(action);
      const pause = between(action.kind === 'answer' ? answerDelay : stepDelay);
      if (pause <= 0 || waitedFor === key) {
        try {
          await perform(sessionId, w.actor, w.rig, state, action);
        } catch (e) {
          // Another runner (a second process) got there first: decide again from the log as it now stands.
          if (!(e instanceof AppError && e.status === 409)) throw e;
        }
        w.again = true;
        return;
      }
      waitedFor = key;
      await sleep(pause);
    }
  }

  async function drain(sessionId: string, w: Worker): Promise<void> {
    try {
      while (w.again && !stopped && !ignored.has(sessionId)) {
        w.again = false;
        await step(sessionId, w);
      }
    } catch (e) {
      log(`session ${sessionId}: stopped on an error; the next event wakes it`, e);
    } finally {
      w.running = false;
      if (ignored.has(sessionId)) workers.delete(sessionId);
    }
  }

  function kick(sessionId: string): void {
    if (stopped || ignored.has(sessionId)) return;
    let w = workers.get(sessionId);
    if (!w) {
      w = { running: false, again: false, done: Promise.resolve() };
      workers.set(sessionId, w);
    }
    w.again = true;
    if (w.running) return;
    w.running = true;
    w.done = drain(sessionId, w);
  }

  const unsubscribe = onStoredEvent((event) => {
    if (event.type === 'session:opened' && ((event.payload as SessionOpenedPayload).virtualSeed ?? null) === null) {
      drop(event.sessionId);
      return;
    }
    kick(event.sessionId);
  });
  const unsubscribeJoins = onSessionJoined((sessionId) => kick(sessionId));

  const resumed =
    options.resume === false
      ? Promise.resolve()
      : listLiveDemoSessionIds(db)
          .then((ids) => ids.forEach(kick))
          .catch((e: unknown) => log('could not list the live demo sessions', e));

  return {
    kick,
    /** Resolves when no session has work queued or under way. */
    async idle(): Promise<void> {
      await resumed;
      for (;;) {
        const busy = [...workers.values()].filter((w) => w.running);
        if (busy.length === 0) return;
        await Promise.all(busy.map((w) => w.done));
      }
    },
    async stop(): Promise<void> {
      stopped = true;
      unsubscribe();
      unsubscribeJoins();
      for (const wake of [...sleepers]) wake();
      await resumed;
      await Promise.all([...workers.values()].map((w) => w.done));
    },
  };
}

export type VirtualTechnician = ReturnType<typeof startVirtualTechnician>;
