import { z } from 'zod';

/** A level reading as a person enters it: the payload shared by the form, the route handler and the socket. */
export const levelReadingInput = z.strictObject({
  kind: z.literal('level'),
  /** The axis the level lies along: 'x' across the table (left-right), 'y' along it (front-back). */
  axis: z.enum(['x', 'y'], { error: 'must be "x" or "y"' }),
  /** Where the level sits along the travel being checked, mm from the table centre. */
  positionMm: z
    .number({ error: 'must be a number' })
    .finite()
    .min(-5000, 'must be within ±5000 mm')
    .max(5000, 'must be within ±5000 mm'),
  /** Bubble position in divisions, positive toward the level's marked end (which points to +x or +y). */
  divisions: z
    .number({ error: 'must be a number' })
    .finite()
    .min(-100, 'must be within ±100')
    .max(100, 'must be within ±100'),
});
export type LevelReadingInput = z.infer<typeof levelReadingInput>;

/** Fields every command carries: a client-made id makes a resend harmless. */
const commandBase = {
  id: z.uuid({ error: 'must be a UUID made by the client' }),
  sessionId: z.uuid({ error: 'must be a UUID' }),
  clientTs: z.iso.datetime({ offset: true, error: 'must be an ISO 8601 time' }).optional(),
};

export const readingSubmit = z.strictObject({ ...commandBase, reading: levelReadingInput });
export type ReadingSubmit = z.infer<typeof readingSubmit>;

export const sessionJoin = z.strictObject({
  sessionId: z.uuid({ error: 'must be a UUID' }),
  afterSeq: z.number().int().min(0).default(0),
});
export type SessionJoin = z.infer<typeof sessionJoin>;

export const openSessionInput = z.strictObject({
  machineId: z.uuid({ error: 'must be a UUID' }),
  /** Sensitivity of the level used, µrad per division (0.02 mm/m = 20 µrad; JIS B 7510). */
  levelDivisionUrad: z.number().finite().positive('must be positive').max(1000).default(20),
});
