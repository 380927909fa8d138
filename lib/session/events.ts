import type { SessionStage } from './stages';

/** Event types in the session log, past tense. One name for the stored type and the broadcast. */
export const EVENT_TYPES = [
  'session:opened',
  'participant:added',
  'stage:entered',
  'reading:recorded',
  'check:marked',
  'move:sent',
  'move:answered',
  'note:posted',
  'photo:attached',
  'session:ended',
  'review:commented',
  'review:returned',
  'session:resumed',
  'review:approved',
] as const;
export type EventType = (typeof EVENT_TYPES)[number];

/** Who takes part in a session: one technician measures and turns screws, experts coach, observers watch. */
export type Part = 'technician' | 'expert' | 'observer';

/** A screw as the session knows it: copied from the footprint when the session opened. */
export type SessionScrew = {
  id: string;
  label: string;
  kind: 'corner' | 'middle' | 'outrigger';
  xMm: number;
  yMm: number;
  /** Lift per turn, mm (the thread's pitch unless the pad says otherwise). */
  liftPerTurnMm: number;
  specifiedHeightMm: number | null;
};

export type SessionTolerances = { levelUrad: number; twistUrad: number; bowUrad: number; sweepTirUm: number };

export type SessionOpenedPayload = {
  machineId: string;
  levelDivisionUrad: number;
  /** Copied from the machine at opening, so the record stands even if the machine is edited later. */
  machineLabel?: string;
  travelMm?: number;
  tolerances?: SessionTolerances;
  screws?: SessionScrew[];
  /** A demo session run by the virtual technician, from this seed. */
  virtualSeed?: number | null;
};

export type ParticipantAddedPayload = { userId: string; name: string; part: Part };

export type StageEnteredPayload = { stage: SessionStage };

/** A level reading: the bubble in divisions, with the slope it means with the session's level. */
export type LevelReadingPayload = {
  kind: 'level';
  stage?: SessionStage;
  axis: 'x' | 'y';
  /** Station along the Y travel, mm from the table centre (the level sits on the table's centre line). */
  positionMm: number;
  divisions: number;
  /** The divisions converted with the session's level: µrad, positive = rising toward +axis. */
  slopeUrad: number;
};

/** The reversal test: the same spot read, then read again with the level turned 180°. */
export type ReversalReadingPayload = {
  kind: 'reversal';
  stage: SessionStage;
  axis: 'x' | 'y';
  firstDiv: number;
  secondDiv: number;
  slopeDiv: number;
  zeroErrorDiv: number;
  repeats: boolean;
};

/** The base's height above the floor at one screw, mm. */
export type HeightReadingPayload = { kind: 'height'; stage: SessionStage; screwId: string; heightMm: number };

/** A spindle sweep: indicator readings in µm on a circle of diameterMm, positive = tip pushed in. */
export type SweepReadingPayload = {
  kind: 'sweep';
  stage: SessionStage;
  diameterMm: number;
  frontUm: number;
  backUm: number;
  leftUm: number;
  rightUm: number;
};

export type ReadingPayload = LevelReadingPayload | ReversalReadingPayload | HeightReadingPayload | SweepReadingPayload;

export type CheckMarkedPayload = { stage: SessionStage; item: string; done: boolean };

export type MoveSentPayload = {
  moveId: string;
  screwId: string;
  stage: SessionStage;
  /** µm, positive raises the base at the screw. */
  raiseUm: number;
  turns: number;
  degrees: number;
  /** The engine's recommendation sent unchanged (false: the expert changed or wrote it). */
  recommended: boolean;
  note?: string;
};

export type MoveAnsweredPayload =
  | { moveId: string; outcome: 'done'; turns: number; raiseUm: number }
  | { moveId: string; outcome: 'cannot'; reason: string };

export type NotePostedPayload = { text: string };

export type PhotoAttachedPayload = {
  photoId: string;
  stage: SessionStage;
  caption: string;
  contentType: string;
  bytes: number;
  key: string;
  thumbKey: string | null;
};

export type SessionEndedPayload = { reason?: string };

/** A reviewer's comment pinned to a moment of the record: the seq the replay stood at. */
export type ReviewCommentedPayload = { atSeq: number; text: string };

/** The reviewer sends the session back for rework, saying why. */
export type ReviewReturnedPayload = { reasons: string[] };

/** The technician takes a returned session up again (rework): it is live until ended again. */
export type SessionResumedPayload = { note?: string };

/**
 * A drawn signature: strokes of points in a box `width` × `height` (pixels of the pad it was drawn on), each stroke
 * flat as x0, y0, x1, y1, … rounded to whole pixels.
 */
export type Signature = { width: number; height: number; strokes: number[][] };

/** The reviewer approves the record: the name typed and the signature drawn. */
export type ReviewApprovedPayload = { name: string; signature: Signature };

type Payloads = {
  'session:opened': SessionOpenedPayload;
  'participant:added': ParticipantAddedPayload;
  'stage:entered': StageEnteredPayload;
  'reading:recorded': ReadingPayload;
  'check:marked': CheckMarkedPayload;
  'move:sent': MoveSentPayload;
  'move:answered': MoveAnsweredPayload;
  'note:posted': NotePostedPayload;
  'photo:attached': PhotoAttachedPayload;
  'session:ended': SessionEndedPayload;
  'review:commented': ReviewCommentedPayload;
  'review:returned': ReviewReturnedPayload;
  'session:resumed': SessionResumedPayload;
  'review:approved': ReviewApprovedPayload;
};

export type PayloadOf<T extends EventType> = Payloads[T];

/** A stored event as the API and the sockets carry it (times as ISO strings). */
export type SessionEvent<T extends EventType = EventType> = {
  sessionId: string;
  seq: number;
  id: string;
  type: T;
  payload: PayloadOf<T>;
  actorId: string | null;
  actorRole: string;
  clientTs: string | null;
  serverTs: string;
  prevHash: string;
  hash: string;
};

/** Narrows an event by type. */
export function isEvent<T extends EventType>(e: SessionEvent, type: T): e is SessionEvent<T> {
  return e.type === type;
}
