import type { Db } from '@/db/client';
import type { LevelingSession } from '@/db/schema';
import { appendChecked, listEventsBySession, type NewEvent, type SessionHead, type Tx } from '@/db/queries/events';
import { getSessionAccess, getSessionForOrganisation, setSessionState, type SessionAccessRow } from '@/db/queries/sessions';
import type { Actor } from '@/lib/auth/actor';
import { assertCan } from '@/lib/auth/policy';
import { AppError } from '@/lib/errors';
import { readingToSlopeUrad, reversalCheck } from '@/lib/leveling/level';
import { broadcast } from '@/lib/realtime/bus';
import type {
  CheckMark,
  MoveAnswer,
  MoveSend,
  NotePost,
  ReadingSubmit,
  ReviewApprove,
  ReviewComment,
  ReviewReturn,
  SessionEnd,
  SessionResume,
  StageEnter,
} from './commands';
import { moveOfTurns, stageChecklist } from './derive';
import type { Part, ReadingPayload, SessionEvent } from './events';
import { foldEvents, type SessionState } from './fold';
import { groupAppender } from './group-append';

/** What the caller is in a session: a participant's part, or a reader (reviewers and admins read every session). */
export type Standing = Part | 'reader';

/** Which standing may send each command. Observers send notes only; readers send nothing. */
export const COMMAND_PARTS = {
  'reading:submit': ['technician'],
  'check:mark': ['technician'],
  'stage:enter': ['technician'],
  'photo:attach': ['technician'],
  'move:send': ['expert'],
  'move:answer': ['technician'],
  'note:post': ['technician', 'expert', 'observer'],
  'session:end': ['technician', 'expert'],
  'session:resume': ['technician'],
  'review:comment': ['reader'],
  'review:return': ['reader'],
  'review:approve': ['reader'],
} as const satisfies Record<string, readonly Standing[]>;
export type SessionCommand = keyof typeof COMMAND_PARTS;

const doing: Record<SessionCommand, string> = {
  'reading:submit': 'records readings',
  'check:mark': 'marks the checklist',
  'stage:enter': 'moves between stages',
  'photo:attach': 'attaches photos',
  'move:send': 'sends moves',
  'move:answer': 'answers moves',
  'note:post': 'posts notes',
  'session:end': 'ends the session',
  'session:resume': 'takes the session up again',
  'review:comment': 'comments on the record (reviewers and admins)',
  'review:return': 'returns the record (reviewers and admins)',
  'review:approve': 'approves the record (reviewers and admins)',
};

export type SessionAccess = { session: SessionAccessRow; standing: Standing };

/** The caller's standing in a session: 404 when it is absent or another organisation's, 403 when they take no part. */
export async function accessSession(db: Db, actor: Actor, sessionId: string): Promise<SessionAccess> {
  assertCan(actor, 'session:view');
  const session = await getSessionAccess(db, { sessionId, userId: actor.id, organisationId: actor.organisationId });
  if (!session) throw new AppError('not_found:session', 'No such session');
  return { session, standing: standingOf(actor, session.part) };
}

/** The caller's standing from their part in the session (null when they have none): 403 when they take no part. */
export function standingOf(actor: Actor, part: Part | null): Standing {
  const standing: Standing | null = part ?? (actor.role === 'reviewer' || actor.role === 'admin' ? 'reader' : null);
  if (!standing) throw new AppError('forbidden:session', 'You do not take part in this session; ask its technician to add you');
  return standing;
}

/** Refuses `command` to a standing that may not send it (403 naming who may). */
export function assertMaySend(standing: Standing, command: SessionCommand): void {
  if ((COMMAND_PARTS[command] as readonly Standing[]).includes(standing)) return;
  const who = COMMAND_PARTS[command].join(' or ');
  throw new AppError(`forbidden:${command.split(':')[0]}`, `Only the session’s ${who} ${doing[command]}; you are ${standing === 'reader' ? 'reading it' : `its ${standing}`}`);
}

/** The session with its machine, if the actor may see it (see accessSession). */
export async function loadSessionFor(db: Db, actor: Actor, sessionId: string) {
  const access = await accessSession(db, actor, sessionId);
  const session = await getSessionForOrganisation(db, { sessionId, organisationId: actor.organisationId });
  if (!session) throw new AppError('not_found:session', 'No such session');
  return { ...session, standing: access.standing };
}

/** Checks the caller may send `command`: the right part in the session (whether it is still live is checked at the append). */
export async function accessForCommand(db: Db, actor: Actor, sessionId: string, command: SessionCommand): Promise<SessionAccess> {
  const access = await accessSession(db, actor, sessionId);
  assertMaySend(access.standing, command);
  return access;
}

/**
 * Refuses a command once the session is no longer live. Checked under the session's row lock, after a resent id has
 * been answered with its stored event, so a command stored before the end and resent after it still gets its ack.
 */
export function assertLive(head: Pick<SessionHead, 'state'>): void {
  assertState(head, ['live']);
}

const stateWords: Record<string, string> = { live: 'live', ended: 'ended', in_review: 'in review', returned: 'returned', approved: 'approved', planned: 'planned' };

/** Refuses a command unless the session stands in one of `states` (409 naming both). */
export function assertState(head: Pick<SessionHead, 'state'>, states: readonly LevelingSession['state'][]): void {
  if (states.includes(head.state as LevelingSession['state'])) return;
  const wanted = states.map((x) => stateWords[x]).join(' or ');
  throw new AppError('conflict:session', `The session is ${stateWords[head.state] ?? head.state}, not ${wanted}`);
}

/** The session as it stands, folded from its log (inside the append transaction, under the session's row lock). */
async function stateOf(tx: Tx, sessionId: string): Promise<SessionState> {
  return foldEvents(await listEventsBySession(tx, { sessionId }));
}

function screwOf(state: SessionState, screwId: string, field = 'screwId') {
  const screw = state.screws.find((s) => s.id === screwId);
  if (!screw) throw new AppError(`bad_request:${field}`, `${field}: not a screw of this machine`, field);
  return screw;
}

type Done = { event: SessionEvent; duplicate: boolean };

function base(actor: Actor, cmd: { id: string; sessionId: string; clientTs?: string | undefined }) {
  return { sessionId: cmd.sessionId, id: cmd.id, actorId: actor.id, actorRole: actor.role, clientTs: cmd.clientTs ?? null };
}

async function commit(
  db: Db,
  key: { sessionId: string; id: string; type: NewEvent['type'] },
  build: (tx: Tx, head: SessionHead) => Promise<NewEvent>,
  states: readonly LevelingSession['state'][] = ['live'],
): Promise<Done> {
  const result = await appendChecked(db, key, async (tx, head) => {
    assertState(head, states);
    return build(tx, head);
  });
  if (!result.duplicate) broadcast(result.event);
  return result;
}

/**
 * An append by group commit (see GroupAppender): the caller's access is checked in the batch, under the session's
 * row lock, with the same answers as accessForCommand; `build` reads the locked head only. Broadcast after the commit.
 */
async function commitGrouped(
  db: Db,
  actor: Actor,
  command: SessionCommand,
  key: { sessionId: string; id: string; type: NewEvent['type'] },
  build: (head: SessionHead & { levelDivisionUrad: number }) => NewEvent,
  states: readonly LevelingSession['state'][] = ['live'],
): Promise<Done> {
  assertCan(actor, 'session:view');
  const result = await groupAppender(db).append({
    actor,
    key,
    states,
    admit: (part) => assertMaySend(standingOf(actor, part), command),
    assertState: (head) => assertState(head, states),
    build,
  });
  if (!result.duplicate) broadcast(result.event);
  return result;
}

/**
 * Records a reading: checks the caller and the session, converts it (divisions to slope with the session's level,
 * a reversal to slope and zero error), appends it, then broadcasts it after the commit. Idempotent by command id.
 * Level, reversal and sweep readings go by group commit; a height reading names a screw, which is checked against the
 * log, so it takes the single append.
 */
export async function recordReading(db: Db, actor: Actor, cmd: ReadingSubmit): Promise<Done> {
  const r = cmd.reading;
  const key = { sessionId: cmd.sessionId, id: cmd.id, type: 'reading:recorded' } as const;
  if (r.kind === 'height') {
    await accessForCommand(db, actor, cmd.sessionId, 'reading:submit');
    return commit(db, key, async (tx) => {
      screwOf(await stateOf(tx, cmd.sessionId), r.screwId, 'reading.screwId');
      return { ...base(actor, cmd), type: 'reading:recorded', payload: r };
    });
  }
  return commitGrouped(db, actor, 'reading:submit', key, (head) => {
    let payload: ReadingPayload;
    switch (r.kind) {
      case 'level':
        payload = { ...r, slopeUrad: readingToSlopeUrad(r.divisions, head.levelDivisionUrad) };
        break;
      case 'reversal':
        payload = { ...r, ...reversalCheck(r.firstDiv, r.secondDiv) };
        break;
      case 'sweep':
        payload = r;
        break;
    }
    return { ...base(actor, cmd), type: 'reading:recorded', payload };
  });
}

export async function enterStage(db: Db, actor: Actor, cmd: StageEnter): Promise<Done> {
  return commitGrouped(db, actor, 'stage:enter', { sessionId: cmd.sessionId, id: cmd.id, type: 'stage:entered' }, () => ({
    ...base(actor, cmd),
    type: 'stage:entered',
    payload: { stage: cmd.stage },
  }));
}

export async function markCheck(db: Db, actor: Actor, cmd: CheckMark): Promise<Done> {
  await accessForCommand(db, actor, cmd.sessionId, 'check:mark');
  return commit(db, { sessionId: cmd.sessionId, id: cmd.id, type: 'check:marked' }, async (tx) => {
    const state = await stateOf(tx, cmd.sessionId);
    if (!stageChecklist(cmd.stage, state.screws).some((c) => c.id === cmd.item)) {
      throw new AppError('bad_request:item', `item: "${cmd.item}" is not on the ${cmd.stage} checklist`, 'item');
    }
    return { ...base(actor, cmd), type: 'check:marked', payload: { stage: cmd.stage, item: cmd.item, done: cmd.done } };
  });
}

/** A move from the coach: one screw by turns of the wrench; stored with its height in µm and degrees of swing. */
export async function sendMove(db: Db, actor: Actor, cmd: MoveSend): Promise<Done> {
  await accessForCommand(db, actor, cmd.sessionId, 'move:send');
  return commit(db, { sessionId: cmd.sessionId, id: cmd.id, type: 'move:sent' }, async (tx) => {
    const state = await stateOf(tx, cmd.sessionId);
    const move = moveOfTurns(screwOf(state, cmd.screwId), cmd.turns);
    return {
      ...base(actor, cmd),
      type: 'move:sent',
      payload: {
        moveId: cmd.id,
        screwId: cmd.screwId,
        stage: cmd.stage,
        raiseUm: move.raiseUm,
        turns: move.turns,
        degrees: move.degrees,
        recommended: cmd.recommended,
        ...(cmd.note ? { note: cmd.note } : {}),
      },
    };
  });
}

/** The technician's answer to a move: done (with what was actually turned) or cannot (with a reason). */
export async function answerMove(db: Db, actor: Actor, cmd: MoveAnswer): Promise<Done> {
  await accessForCommand(db, actor, cmd.sessionId, 'move:answer');
  return commit(db, { sessionId: cmd.sessionId, id: cmd.id, type: 'move:answered' }, async (tx) => {
    const state = await stateOf(tx, cmd.sessionId);
    const move = state.moves.find((m) => m.moveId === cmd.moveId);
    if (!move) throw new AppError('bad_request:moveId', 'moveId: no such move in this session', 'moveId');
    if (move.status !== 'pending') throw new AppError('conflict:move', `That move was already answered (${move.status === 'done' ? 'done' : 'cannot'})`, 'moveId');
    const payload =
      cmd.outcome === 'done'
        ? { moveId: cmd.moveId, outcome: 'done' as const, turns: cmd.turns, raiseUm: moveOfTurns(screwOf(state, move.screwId), cmd.turns).raiseUm }
        : { moveId: cmd.moveId, outcome: 'cannot' as const, reason: cmd.reason };
    return { ...base(actor, cmd), type: 'move:answered', payload };
  });
}

export async function postNote(db: Db, actor: Actor, cmd: NotePost): Promise<Done> {
  return commitGrouped(db, actor, 'note:post', { sessionId: cmd.sessionId, id: cmd.id, type: 'note:posted' }, () => ({
    ...base(actor, cmd),
    type: 'note:posted',
    payload: { text: cmd.text },
  }));
}

/** Ends a live session: the state moves to ended in the same transaction as the event. */
export async function endSession(db: Db, actor: Actor, cmd: SessionEnd): Promise<Done> {
  await accessForCommand(db, actor, cmd.sessionId, 'session:end');
  return commit(db, { sessionId: cmd.sessionId, id: cmd.id, type: 'session:ended' }, async (tx) => {
    await setSessionState(tx, cmd.sessionId, 'ended');
    return { ...base(actor, cmd), type: 'session:ended', payload: cmd.reason ? { reason: cmd.reason } : {} };
  });
}

/** The technician takes a returned session up again for rework: it is live until it ends again. */
export async function resumeSession(db: Db, actor: Actor, cmd: SessionResume): Promise<Done> {
  await accessForCommand(db, actor, cmd.sessionId, 'session:resume');
  return commit(
    db,
    { sessionId: cmd.sessionId, id: cmd.id, type: 'session:resumed' },
    async (tx) => {
      await setSessionState(tx, cmd.sessionId, 'live');
      return { ...base(actor, cmd), type: 'session:resumed', payload: cmd.note ? { note: cmd.note } : {} };
    },
    ['returned'],
  );
}

const REVIEWABLE = ['ended', 'in_review'] as const;

/** A reviewer's comment pinned to a moment of the record; the first one puts an ended session in review. */
export async function commentOnRecord(db: Db, actor: Actor, cmd: ReviewComment): Promise<Done> {
  assertCan(actor, 'session:review');
  await accessForCommand(db, actor, cmd.sessionId, 'review:comment');
  return commit(
    db,
    { sessionId: cmd.sessionId, id: cmd.id, type: 'review:commented' },
    async (tx, head) => {
      if (cmd.atSeq > head.lastSeq) throw new AppError('bad_request:atSeq', `atSeq: the record ends at ${head.lastSeq}`, 'atSeq');
      if (head.state === 'ended') await setSessionState(tx, cmd.sessionId, 'in_review');
      return { ...base(actor, cmd), type: 'review:commented', payload: { atSeq: cmd.atSeq, text: cmd.text } };
    },
    [...REVIEWABLE, 'returned'],
  );
}

/** The reviewer returns the record for rework, with reasons; the technician sees them and may take it up again. */
export async function returnRecord(db: Db, actor: Actor, cmd: ReviewReturn): Promise<Done> {
  assertCan(actor, 'session:review');
  await accessForCommand(db, actor, cmd.sessionId, 'review:return');
  return commit(
    db,
    { sessionId: cmd.sessionId, id: cmd.id, type: 'review:returned' },
    async (tx) => {
      await setSessionState(tx, cmd.sessionId, 'returned');
      return { ...base(actor, cmd), type: 'review:returned', payload: { reasons: cmd.reasons } };
    },
    REVIEWABLE,
  );
}

/** The reviewer approves the record with a typed name and a drawn signature; the machine's next check runs from now. */
export async function approveRecord(db: Db, actor: Actor, cmd: ReviewApprove): Promise<Done> {
  assertCan(actor, 'session:review');
  await accessForCommand(db, actor, cmd.sessionId, 'review:approve');
  return commit(
    db,
    { sessionId: cmd.sessionId, id: cmd.id, type: 'review:approved' },
    async (tx) => {
      await setSessionState(tx, cmd.sessionId, 'approved', new Date());
      return { ...base(actor, cmd), type: 'review:approved', payload: { name: cmd.name, signature: cmd.signature } };
    },
    REVIEWABLE,
  );
}
