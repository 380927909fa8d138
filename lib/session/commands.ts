import { z } from 'zod';
import { SESSION_STAGES } from './stages';

/** A finite number within [min, max]; the error names the range (the field's name comes from the path). */
const num = (_label: string, min: number, max: number) => {
  const range = min === -max ? `within ±${max}` : `from ${min} to ${max}`;
  return z
    .number({ error: 'must be a number' })
    .finite('must be a finite number')
    .min(min, `must be ${range}`)
    .max(max, `must be ${range}`);
};

const stage = z.enum(SESSION_STAGES, { error: `must be one of ${SESSION_STAGES.join(', ')}` });
const axis = z.enum(['x', 'y'], { error: 'must be "x" or "y"' });

/** A level reading as a person enters it: the payload shared by the form, the route handler and the socket. */
export const levelReadingInput = z.strictObject({
  kind: z.literal('level'),
  /** The stage the reading was taken in (the technician's screen decides; offline readings keep theirs). */
  stage: stage.optional(),
  /** The axis the level lies along: 'x' across the table (left-right), 'y' along it (front-back). */
  axis,
  /** Where the level sits along the Y travel, mm from the table centre. */
  positionMm: num('position', -5000, 5000),
  /** Bubble position in divisions, positive toward the level's marked end (which points to +x or +y). */
  divisions: num('divisions', -100, 100),
});
export type LevelReadingInput = z.infer<typeof levelReadingInput>;

/** The reversal test: both readings in divisions, the second with the level turned 180° on the same spot. */
export const reversalReadingInput = z.strictObject({
  kind: z.literal('reversal'),
  stage,
  axis,
  firstDiv: num('first reading', -100, 100),
  secondDiv: num('second reading', -100, 100),
});

/** Height of the base above the floor at one screw, mm. */
export const heightReadingInput = z.strictObject({
  kind: z.literal('height'),
  stage,
  screwId: z.uuid({ error: 'must be the id of one of the machine’s screws' }),
  heightMm: num('height', 0, 2000),
});

/** Four indicator readings of a spindle sweep, µm (the client converts from the user's units). */
export const sweepReadingInput = z.strictObject({
  kind: z.literal('sweep'),
  stage,
  diameterMm: num('sweep diameter', 10, 2000).default(254),
  frontUm: num('front', -5000, 5000),
  backUm: num('back', -5000, 5000),
  leftUm: num('left', -5000, 5000),
  rightUm: num('right', -5000, 5000),
});

export const readingInput = z.discriminatedUnion('kind', [levelReadingInput, reversalReadingInput, heightReadingInput, sweepReadingInput], {
  error: 'must be a level, reversal, height or sweep reading',
});
export type ReadingInput = z.input<typeof readingInput>;

/** Fields every command carries: a client-made id makes a resend harmless. */
const commandBase = {
  id: z.uuid({ error: 'must be a UUID made by the client' }),
  sessionId: z.uuid({ error: 'must be a UUID' }),
  clientTs: z.iso.datetime({ offset: true, error: 'must be an ISO 8601 time' }).optional(),
};

export const readingSubmit = z.strictObject({ ...commandBase, reading: readingInput });
export type ReadingSubmit = z.infer<typeof readingSubmit>;

export const stageEnter = z.strictObject({ ...commandBase, stage });
export type StageEnter = z.infer<typeof stageEnter>;

export const checkMark = z.strictObject({
  ...commandBase,
  stage,
  item: z.string().trim().min(1, 'must name the checklist item').max(80),
  done: z.boolean({ error: 'must be true or false' }),
});
export type CheckMark = z.infer<typeof checkMark>;

/** A move the coach sends: one screw, by turns of the wrench (negative lowers). The command id is the move's id. */
export const moveSend = z.strictObject({
  ...commandBase,
  stage,
  screwId: z.uuid({ error: 'must be the id of one of the machine’s screws' }),
  turns: num('turns', -5, 5).refine((t) => t !== 0, 'must not be zero'),
  recommended: z.boolean().default(false),
  note: z.string().trim().max(500, 'must be at most 500 characters').optional(),
});
export type MoveSend = z.infer<typeof moveSend>;

export const moveAnswer = z.discriminatedUnion(
  'outcome',
  [
    z.strictObject({ ...commandBase, moveId: z.uuid({ error: 'must be a UUID' }), outcome: z.literal('done'), turns: num('turns', -5, 5) }),
    z.strictObject({
      ...commandBase,
      moveId: z.uuid({ error: 'must be a UUID' }),
      outcome: z.literal('cannot'),
      reason: z.string().trim().min(1, 'must say why the move cannot be made').max(500, 'must be at most 500 characters'),
    }),
  ],
  { error: 'must be "done" or "cannot"' },
);
export type MoveAnswer = z.infer<typeof moveAnswer>;

export const notePost = z.strictObject({
  ...commandBase,
  text: z.string().trim().min(1, 'must not be empty').max(2000, 'must be at most 2000 characters'),
});
export type NotePost = z.infer<typeof notePost>;

export const sessionEnd = z.strictObject({ ...commandBase, reason: z.string().trim().max(500).optional() });
export type SessionEnd = z.infer<typeof sessionEnd>;

export const sessionJoin = z.strictObject({
  sessionId: z.uuid({ error: 'must be a UUID' }),
  afterSeq: z.number().int().min(0).default(0),
});
export type SessionJoin = z.infer<typeof sessionJoin>;

export const openSessionInput = z.strictObject({
  machineId: z.uuid({ error: 'must be a UUID' }),
  visitId: z.uuid({ error: 'must be a UUID' }).optional(),
  /** Sensitivity of the level used, µrad per division (0.02 mm/m = 20 µrad; JIS B 7510). */
  levelDivisionUrad: z.number().finite().positive('must be positive').max(1000).default(20),
  /** Experts who coach and observers who watch, besides the technician who opens it. */
  experts: z.array(z.uuid({ error: 'must be a user id' })).max(10).default([]),
  observers: z.array(z.uuid({ error: 'must be a user id' })).max(20).default([]),
});
export type OpenSessionInput = z.infer<typeof openSessionInput>;

export const addParticipantInput = z.strictObject({
  userId: z.uuid({ error: 'must be a user id' }),
  part: z.enum(['expert', 'observer'], { error: 'must be "expert" or "observer"' }),
});
