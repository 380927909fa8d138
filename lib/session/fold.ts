import type {
  MoveSentPayload,
  Part,
  PhotoAttachedPayload,
  ReadingPayload,
  Signature,
  SessionEvent,
  SessionScrew,
  SessionTolerances,
} from './events';
import type { SessionStage } from './stages';

export type RecordedReading = ReadingPayload & { stage: SessionStage; seq: number; serverTs: string; actorId: string | null };

export type MoveState = MoveSentPayload & {
  seq: number;
  sentAt: string;
  sentBy: string | null;
  status: 'pending' | 'done' | 'cannot';
  answeredSeq: number | null;
  answeredAt: string | null;
  /** Done: what was actually turned. */
  doneTurns: number | null;
  doneRaiseUm: number | null;
  reason: string | null;
};

export type NoteState = { seq: number; at: string; actorId: string | null; actorRole: string; text: string };
export type PhotoState = PhotoAttachedPayload & { seq: number; at: string };
export type ParticipantState = { userId: string; name: string; part: Part; seq: number };

/** Where the record stands, as its log says (the session row's `state` column follows the same events). */
export type SessionStatus = 'live' | 'ended' | 'in_review' | 'returned' | 'approved';

export type ReviewComment = { seq: number; at: string; actorId: string | null; atSeq: number; text: string };
export type ReviewReturn = { seq: number; at: string; actorId: string | null; reasons: string[] };
export type ReviewApproval = { seq: number; at: string; actorId: string | null; name: string; signature: Signature };

/** The review of the record: comments pinned to moments, returns for rework and the rework taken up, the approval. */
export type ReviewState = {
  comments: ReviewComment[];
  returns: ReviewReturn[];
  resumes: { seq: number; at: string; actorId: string | null }[];
  approval: ReviewApproval | null;
};

/** What a session looks like after its events: the one implementation, used by server, views, replay and tests. */
export type SessionState = {
  seq: number;
  machineId: string | null;
  machineLabel: string | null;
  levelDivisionUrad: number | null;
  travelMm: number | null;
  tolerances: SessionTolerances | null;
  screws: SessionScrew[];
  virtualSeed: number | null;
  participants: ParticipantState[];
  stage: SessionStage;
  /** Every stage entered, in order, with the seq it was entered at (a stage may be entered again). */
  stageLog: { stage: SessionStage; seq: number; at: string }[];
  readings: RecordedReading[];
  /** Checklist items by id: done or not (the last mark wins). */
  checks: Record<string, boolean>;
  moves: MoveState[];
  notes: NoteState[];
  photos: PhotoState[];
  /** The last end; null while live (a session taken up again for rework is live until it ends again). */
  ended: { seq: number; at: string; reason: string | null } | null;
  status: SessionStatus;
  review: ReviewState;
  /** Latest slope per axis, µrad (positive: rising toward +x / +y); null before the first level reading. */
  slopeXUrad: number | null;
  slopeYUrad: number | null;
};

export const initialState: SessionState = Object.freeze({
  seq: 0,
  machineId: null,
  machineLabel: null,
  levelDivisionUrad: null,
  travelMm: null,
  tolerances: null,
  screws: [],
  virtualSeed: null,
  participants: [],
  stage: 'prepare',
  stageLog: [],
  readings: [],
  checks: {},
  moves: [],
  notes: [],
  photos: [],
  ended: null,
  status: 'live',
  review: Object.freeze({ comments: [], returns: [], resumes: [], approval: null }) as unknown as ReviewState,
  slopeXUrad: null,
  slopeYUrad: null,
}) as SessionState;

/** A copy whose arrays and maps may be changed without touching `s` (events append, so shallow copies suffice). */
function draftOf(s: SessionState): SessionState {
  return {
    ...s,
    participants: [...s.participants],
    stageLog: [...s.stageLog],
    readings: [...s.readings],
    checks: { ...s.checks },
    moves: [...s.moves],
    notes: [...s.notes],
    photos: [...s.photos],
    review: {
      comments: [...s.review.comments],
      returns: [...s.review.returns],
      resumes: [...s.review.resumes],
      approval: s.review.approval,
    },
  };
}

/**
 * Applies one event to a draft in place (see draftOf). Events at or below the draft's seq are ignored. Entries are
 * built with Object.assign, not object spread: V8 copies objects from JSON.parse by spread about ten times slower
 * (measured with `npm run bench:replay`), and a replay folds tens of thousands of them.
 */
function applyInPlace(d: SessionState, e: SessionEvent): void {
  if (e.seq <= d.seq) return;
  d.seq = e.seq;
  switch (e.type) {
    case 'session:opened': {
      const p = e.payload as SessionEvent<'session:opened'>['payload'];
      d.machineId = p.machineId;
      d.levelDivisionUrad = p.levelDivisionUrad;
      d.machineLabel = p.machineLabel ?? null;
      d.travelMm = p.travelMm ?? null;
      d.tolerances = p.tolerances ?? null;
      d.screws = p.screws ?? [];
      d.virtualSeed = p.virtualSeed ?? null;
      d.stageLog.push({ stage: 'prepare', seq: e.seq, at: e.serverTs });
      return;
    }
    case 'participant:added': {
      const p = e.payload as SessionEvent<'participant:added'>['payload'];
      const i = d.participants.findIndex((x) => x.userId === p.userId);
      const entry: ParticipantState = Object.assign({}, p, { seq: e.seq });
      if (i >= 0) d.participants[i] = entry;
      else d.participants.push(entry);
      return;
    }
    case 'stage:entered': {
      const p = e.payload as SessionEvent<'stage:entered'>['payload'];
      d.stage = p.stage;
      d.stageLog.push({ stage: p.stage, seq: e.seq, at: e.serverTs });
      return;
    }
    case 'reading:recorded': {
      const p = e.payload as ReadingPayload;
      d.readings.push(Object.assign({}, p, { stage: p.stage ?? d.stage, seq: e.seq, serverTs: e.serverTs, actorId: e.actorId }));
      if (p.kind === 'level') {
        if (p.axis === 'x') d.slopeXUrad = p.slopeUrad;
        else d.slopeYUrad = p.slopeUrad;
      }
      return;
    }
    case 'check:marked': {
      const p = e.payload as SessionEvent<'check:marked'>['payload'];
      d.checks[p.item] = p.done;
      return;
    }
    case 'move:sent': {
      const p = e.payload as MoveSentPayload;
      d.moves.push(Object.assign({}, p, {
        seq: e.seq,
        sentAt: e.serverTs,
        sentBy: e.actorId,
        status: 'pending',
        answeredSeq: null,
        answeredAt: null,
        doneTurns: null,
        doneRaiseUm: null,
        reason: null,
      } as const));
      return;
    }
    case 'move:answered': {
      const p = e.payload as SessionEvent<'move:answered'>['payload'];
      // From the end: a move is answered soon after it is sent.
      let i = d.moves.length - 1;
      while (i >= 0 && d.moves[i]!.moveId !== p.moveId) i--;
      if (i < 0) return;
      d.moves[i] = Object.assign(
        {},
        d.moves[i]!,
        { answeredSeq: e.seq, answeredAt: e.serverTs },
        p.outcome === 'done' ? { status: 'done' as const, doneTurns: p.turns, doneRaiseUm: p.raiseUm } : { status: 'cannot' as const, reason: p.reason },
      );
      return;
    }
    case 'note:posted': {
      const p = e.payload as SessionEvent<'note:posted'>['payload'];
      d.notes.push({ seq: e.seq, at: e.serverTs, actorId: e.actorId, actorRole: e.actorRole, text: p.text });
      return;
    }
    case 'photo:attached': {
      const p = e.payload as PhotoAttachedPayload;
      d.photos.push(Object.assign({}, p, { seq: e.seq, at: e.serverTs }));
      return;
    }
    case 'session:ended': {
      const p = e.payload as SessionEvent<'session:ended'>['payload'];
      d.ended = { seq: e.seq, at: e.serverTs, reason: p.reason ?? null };
      d.status = 'ended';
      return;
    }
    case 'review:commented': {
      const p = e.payload as SessionEvent<'review:commented'>['payload'];
      d.review.comments.push({ seq: e.seq, at: e.serverTs, actorId: e.actorId, atSeq: p.atSeq, text: p.text });
      if (d.status === 'ended') d.status = 'in_review';
      return;
    }
    case 'review:returned': {
      const p = e.payload as SessionEvent<'review:returned'>['payload'];
      d.review.returns.push({ seq: e.seq, at: e.serverTs, actorId: e.actorId, reasons: p.reasons });
      d.status = 'returned';
      return;
    }
    case 'session:resumed': {
      d.review.resumes.push({ seq: e.seq, at: e.serverTs, actorId: e.actorId });
      d.ended = null;
      d.status = 'live';
      return;
    }
    case 'review:approved': {
      const p = e.payload as SessionEvent<'review:approved'>['payload'];
      d.review.approval = { seq: e.seq, at: e.serverTs, actorId: e.actorId, name: p.name, signature: p.signature };
      d.status = 'approved';
      return;
    }
    default:
      return;
  }
}

/** A copy of `s` that later events may extend without touching `s` (a replay keeps these as snapshots). */
export function snapshotOf(s: SessionState): SessionState {
  return draftOf(s);
}

/** Applies events in place onto a draft made by snapshotOf (the replay's seek; foldEvents for everyone else). */
export function applyAllInPlace(d: SessionState, events: readonly SessionEvent[], from = 0, to = events.length): void {
  for (let i = from; i < to; i++) applyInPlace(d, events[i]!);
}

/** Applies one event; events at or below the state's seq are ignored, so replays are harmless. */
export function applyEvent(state: SessionState, e: SessionEvent): SessionState {
  if (e.seq <= state.seq) return state;
  const d = draftOf(state);
  applyInPlace(d, e);
  return d;
}

/** Folds events in seq order onto `from` (copied once, so the cost is linear in the number of events). */
export function foldEvents(events: readonly SessionEvent[], from: SessionState = initialState): SessionState {
  if (!events.some((e) => e.seq > from.seq)) return from;
  const d = draftOf(from);
  for (const e of events) applyInPlace(d, e);
  return d;
}
