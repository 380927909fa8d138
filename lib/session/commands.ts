// zod/mini: the field view validates with these schemas too, and the mini build keeps its bundle small.
import * as z from 'zod/mini';
import { SESSION_STAGES } from './stages';

/** A finite number within [min, max]; the error names the range (the field's name comes from the path). */
const num = (_label: string, min: number, max: number) => {
  const range = min === -max ? `within ±${max}` : `from ${min} to ${max}`;
  // zod 4 numbers refuse NaN and ±Infinity themselves.
  return z.number({ error: 'must be a number' }).check(z.gte(min, `must be ${range}`), z.lte(max, `must be ${range}`));
};

const stage = z.enum(SESSION_STAGES, { error: `must be one of ${SESSION_STAGES.join(', ')}` });
const axis = z.enum(['x', 'y'], { error: 'must be "x" or "y"' });

/** A level reading as a person enters it: the payload shared by the form, the route handler and the socket. */
export const levelReadingInput = z.strictObject({
  kind: z.literal('level'),
  /** The stage the reading was taken in (the technician's screen decides; offline readings keep theirs). */
  stage: z.optional(stage),
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
  diameterMm: z._default(num('sweep diameter', 10, 2000), 254),
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
  // PostgreSQL has no year 0000: such a time would fail at the insert, not here.
  clientTs: z.optional(z.iso.datetime({ offset: true, error: 'must be an ISO 8601 time' }).check(z.refine((t) => !t.startsWith('0000'), 'must be an ISO 8601 time from year 1'))),
};

export const readingSubmit = z.strictObject({ ...commandBase, reading: readingInput });
export type ReadingSubmit = z.infer<typeof readingSubmit>;

export const stageEnter = z.strictObject({ ...commandBase, stage });
export type StageEnter = z.infer<typeof stageEnter>;

export const checkMark = z.strictObject({
  ...commandBase,
  stage,
  item: z.string().check(z.trim(), z.minLength(1, 'must name the checklist item'), z.maxLength(80, 'must be at most 80 characters')),
  done: z.boolean({ error: 'must be true or false' }),
});
export type CheckMark = z.infer<typeof checkMark>;

/** A move the coach sends: one screw, by turns of the wrench (negative lowers). The command id is the move's id. */
export const moveSend = z.strictObject({
  ...commandBase,
  stage,
  screwId: z.uuid({ error: 'must be the id of one of the machine’s screws' }),
  turns: num('turns', -5, 5).check(z.refine((t) => t !== 0, 'must not be zero')),
  recommended: z._default(z.boolean(), false),
  note: z.optional(z.string().check(z.trim(), z.maxLength(500, 'must be at most 500 characters'))),
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
      reason: z.string().check(z.trim(), z.minLength(1, 'must say why the move cannot be made'), z.maxLength(500, 'must be at most 500 characters')),
    }),
  ],
  { error: 'must be "done" or "cannot"' },
);
export type MoveAnswer = z.infer<typeof moveAnswer>;

export const notePost = z.strictObject({
  ...commandBase,
  text: z.string().check(z.trim(), z.minLength(1, 'must not be empty'), z.maxLength(2000, 'must be at most 2000 characters')),
});
export type NotePost = z.infer<typeof notePost>;

export const sessionEnd = z.strictObject({ ...commandBase, reason: z.optional(z.string().check(z.trim(), z.maxLength(500, 'must be at most 500 characters'))) });
export type SessionEnd = z.infer<typeof sessionEnd>;

const text = (max: number, empty: string) =>
  z.string().check(z.trim(), z.minLength(1, empty), z.maxLength(max, `must be at most ${max} characters`));

/** A reviewer's comment pinned to the moment the replay stands at (the seq of the last event shown). */
export const reviewComment = z.strictObject({
  ...commandBase,
  atSeq: z.int({ error: 'must be a whole number' }).check(z.gte(0, 'must be 0 or more')),
  text: text(2000, 'must not be empty'),
});
export type ReviewComment = z.infer<typeof reviewComment>;

/** The reviewer sends the record back for rework with at least one reason. */
export const reviewReturn = z.strictObject({
  ...commandBase,
  reasons: z.array(text(500, 'must not be empty')).check(z.minLength(1, 'must give at least one reason'), z.maxLength(20, 'at most 20 reasons')),
});
export type ReviewReturn = z.infer<typeof reviewReturn>;

const pixel = z.int({ error: 'must be whole pixels' }).check(z.gte(0, 'must be within the pad'), z.lte(4000, 'must be within the pad'));

/** A drawn signature: at least one stroke of two points or more, within the pad. */
export const signatureInput = z
  .strictObject({
    width: z.int({ error: 'must be whole pixels' }).check(z.gte(50, 'must be at least 50 pixels'), z.lte(4000, 'must be at most 4000 pixels')),
    height: z.int({ error: 'must be whole pixels' }).check(z.gte(20, 'must be at least 20 pixels'), z.lte(4000, 'must be at most 4000 pixels')),
    strokes: z
      .array(
        z
          .array(pixel)
          .check(
            z.minLength(4, 'each stroke needs two points or more'),
            z.maxLength(4000, 'a stroke may hold at most 2000 points'),
            z.refine((a) => a.length % 2 === 0, 'must hold x, y pairs'),
          ),
      )
      .check(z.minLength(1, 'must be drawn'), z.maxLength(100, 'at most 100 strokes')),
  })
  .check(
    z.refine((s) => s.strokes.every((st) => st.every((v, i) => v <= (i % 2 === 0 ? s.width : s.height))), {
      message: 'must lie within the pad',
      path: ['strokes'],
    }),
  );

/** The reviewer approves: the name typed and the signature drawn. */
export const reviewApprove = z.strictObject({
  ...commandBase,
  name: text(120, 'must type your name'),
  signature: signatureInput,
});
export type ReviewApprove = z.infer<typeof reviewApprove>;

/** The technician takes a returned session up again for rework. */
export const sessionResume = z.strictObject({ ...commandBase, note: z.optional(z.string().check(z.trim(), z.maxLength(500, 'must be at most 500 characters'))) });
export type SessionResume = z.infer<typeof sessionResume>;

export const sessionJoin = z.strictObject({
  sessionId: z.uuid({ error: 'must be a UUID' }),
  afterSeq: z._default(z.int().check(z.gte(0)), 0),
});
export type SessionJoin = z.infer<typeof sessionJoin>;

export const openSessionInput = z.strictObject({
  machineId: z.uuid({ error: 'must be a UUID' }),
  visitId: z.optional(z.uuid({ error: 'must be a UUID' })),
  /** Sensitivity of the level used, µrad per division (0.02 mm/m = 20 µrad; JIS B 7510). */
  levelDivisionUrad: z._default(z.number().check(z.gt(0, 'must be positive'), z.lte(1000, 'must be at most 1000')), 20),
  /** Experts who coach and observers who watch, besides the technician who opens it. */
  experts: z._default(z.array(z.uuid({ error: 'must be a user id' })).check(z.maxLength(10, 'at most 10')), []),
  observers: z._default(z.array(z.uuid({ error: 'must be a user id' })).check(z.maxLength(20, 'at most 20')), []),
});
export type OpenSessionInput = z.infer<typeof openSessionInput>;

export const addParticipantInput = z.strictObject({
  userId: z.uuid({ error: 'must be a user id' }),
  part: z.enum(['expert', 'observer'], { error: 'must be "expert" or "observer"' }),
});
