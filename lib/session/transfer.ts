/**
 * A session's record out of Levelwire and back in: the export file (JSON: the whole event log, which is the record),
 * the readings as CSV, and the checks an imported file passes before anything is stored (its shape, then its hash
 * chain). Pure; no clock read (times are passed in), no I/O.
 */
import Papa from 'papaparse';
import { z } from 'zod';
import { EVENT_TYPES, type EventType, type SessionEvent, type SessionOpenedPayload } from './events';
import { foldEvents, type SessionState } from './fold';
import { verifyChain } from './hash-chain';
import { SESSION_STAGES, type SessionStage } from './stages';

export const SESSION_FILE_FORMAT = 'levelwire-session';
export const SESSION_FILE_VERSION = 1;

/** What the export says of the session besides its log; the log alone is the record and verifies itself. */
export type ExportedSession = {
  id: string;
  state: string;
  machine: { id: string; label: string | null; model: string | null; serial: string | null };
};

export type SessionFile = {
  format: typeof SESSION_FILE_FORMAT;
  version: typeof SESSION_FILE_VERSION;
  exportedAt: string;
  session: ExportedSession;
  events: SessionEvent[];
};

/** The export file of a session: its whole log, unchanged, with a header naming the session and its machine. */
export function sessionFileOf(session: ExportedSession, events: SessionEvent[], exportedAt: Date): SessionFile {
  return { format: SESSION_FILE_FORMAT, version: SESSION_FILE_VERSION, exportedAt: exportedAt.toISOString(), session, events };
}

/** `levelwire-session-<serial>-<YYYY-MM-DD>-<id prefix>.<ext>`: the serial made safe for a file name, the day the session opened (UTC). */
export function exportFilename({ serial, openedAt, sessionId }: { serial: string | null; openedAt: string | null; sessionId: string }, ext: 'json' | 'csv'): string {
  const safe = (serial ?? 'machine').replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^[-.]+|-+$/g, '') || 'machine';
  const day = (openedAt ?? '').slice(0, 10) || 'undated';
  return `levelwire-session-${safe}-${day}-${sessionId.slice(0, 8)}.${ext}`;
}

/** The columns of the readings CSV: SI units named in each header (slopes µrad, lengths mm, indicator values µm). */
export const READING_COLUMNS = [
  'seq',
  'server_time',
  'stage',
  'kind',
  'axis',
  'position_mm',
  'divisions',
  'slope_urad',
  'first_div',
  'second_div',
  'reversal_slope_div',
  'zero_error_div',
  'repeats',
  'screw',
  'height_mm',
  'sweep_diameter_mm',
  'front_um',
  'back_um',
  'left_um',
  'right_um',
  'actor_role',
] as const;

/** A cell starting like a formula (=, +, -, @, tab, CR) gets a leading apostrophe: papaparse's own test misses multi-line cells. */
const FORMULA_START = /^[=+\-@\t\r]/;

/**
 * The readings of a log as CSV, one row per `reading:recorded` in seq order, with a header row (RFC 4180 quoting by
 * papaparse, text that a spreadsheet would run as a formula escaped; numbers stay numbers, negative ones included).
 */
export function readingsCsv(events: readonly SessionEvent[]): string {
  let stage: SessionStage = 'prepare';
  let screwLabels = new Map<string, string>();
  const rows: (string | number)[][] = [];
  for (const e of events) {
    if (e.type === 'session:opened') screwLabels = new Map(((e.payload as SessionOpenedPayload).screws ?? []).map((s) => [s.id, s.label]));
    if (e.type === 'stage:entered') stage = (e.payload as SessionEvent<'stage:entered'>['payload']).stage;
    if (e.type !== 'reading:recorded') continue;
    const r = e.payload as SessionEvent<'reading:recorded'>['payload'];
    const cells: Partial<Record<(typeof READING_COLUMNS)[number], string | number>> = {
      seq: e.seq,
      server_time: e.serverTs,
      stage: r.stage ?? stage,
      kind: r.kind,
      actor_role: e.actorRole,
    };
    if (r.kind === 'level') Object.assign(cells, { axis: r.axis, position_mm: r.positionMm, divisions: r.divisions, slope_urad: r.slopeUrad });
    if (r.kind === 'reversal')
      Object.assign(cells, { axis: r.axis, first_div: r.firstDiv, second_div: r.secondDiv, reversal_slope_div: r.slopeDiv, zero_error_div: r.zeroErrorDiv, repeats: r.repeats ? 'yes' : 'no' });
    if (r.kind === 'height') Object.assign(cells, { screw: screwLabels.get(r.screwId) ?? r.screwId, height_mm: r.heightMm });
    if (r.kind === 'sweep') Object.assign(cells, { sweep_diameter_mm: r.diameterMm, front_um: r.frontUm, back_um: r.backUm, left_um: r.leftUm, right_um: r.rightUm });
    rows.push(READING_COLUMNS.map((c) => cells[c] ?? ''));
  }
  return Papa.unparse({ fields: [...READING_COLUMNS], data: rows }, { escapeFormulae: FORMULA_START, newline: '\r\n' });
}

// ---------------------------------------------------------------------------------------------------------------
// The import's checks. Payloads are checked for what the fold and the views read; unknown keys are allowed (they are
// hashed like the rest) and the file's own objects are what gets stored, never a parsed copy.

const LOWER_UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;
/** Lowercase, as PostgreSQL gives uuids back: any other spelling would read back differently and break the hash. */
const lowerUuid = z.string({ error: 'must be a UUID' }).regex(LOWER_UUID, 'must be a lowercase UUID');
/** Times as the server writes them (`toISOString`): the hash covers the text, so it must read back identical. */
const serverTime = z
  .string({ error: 'must be an ISO time' })
  // Year 0000 reads back in JavaScript but PostgreSQL has none (1 BC comes before AD 1): the insert would fail.
  .refine((s) => /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/.test(s) && !s.startsWith('0000') && new Date(s).toISOString() === s, 'must be a UTC time as Levelwire writes it (YYYY-MM-DDTHH:MM:SS.sssZ)');
const num = z.number({ error: 'must be a number' });
const text = (max: number) => z.string({ error: 'must be text' }).max(max, `must be at most ${max} characters`);
const stage = z.enum(SESSION_STAGES, { error: `must be one of ${SESSION_STAGES.join(', ')}` });
const axis = z.enum(['x', 'y'], { error: 'must be "x" or "y"' });
const obj = z.looseObject;

const readingPayload = z.discriminatedUnion(
  'kind',
  [
    obj({ kind: z.literal('level'), stage: stage.optional(), axis, positionMm: num, divisions: num, slopeUrad: num }),
    obj({ kind: z.literal('reversal'), stage, axis, firstDiv: num, secondDiv: num, slopeDiv: num, zeroErrorDiv: num, repeats: z.boolean({ error: 'must be true or false' }) }),
    obj({ kind: z.literal('height'), stage, screwId: text(100), heightMm: num }),
    obj({ kind: z.literal('sweep'), stage, diameterMm: num, frontUm: num, backUm: num, leftUm: num, rightUm: num }),
  ],
  { error: 'must be a level, reversal, height or sweep reading' },
);

const screw = obj({
  id: text(100),
  label: text(100),
  kind: z.enum(['corner', 'middle', 'outrigger'], { error: 'must be corner, middle or outrigger' }),
  xMm: num,
  yMm: num,
  liftPerTurnMm: num,
  specifiedHeightMm: num.nullable(),
});

const payloads = {
  'session:opened': obj({
    machineId: text(100),
    levelDivisionUrad: num.positive('must be positive'),
    machineLabel: text(300).optional(),
    travelMm: num.optional(),
    tolerances: obj({ levelUrad: num, twistUrad: num, bowUrad: num, sweepTirUm: num }).optional(),
    screws: z.array(screw).max(64, 'at most 64 screws').optional(),
    virtualSeed: z.int({ error: 'must be a whole number' }).nullable().optional(),
  }),
  'participant:added': obj({ userId: text(100), name: text(300), part: z.enum(['technician', 'expert', 'observer'], { error: 'must be technician, expert or observer' }) }),
  'stage:entered': obj({ stage }),
  'reading:recorded': readingPayload,
  'check:marked': obj({ stage, item: text(200), done: z.boolean({ error: 'must be true or false' }) }),
  'move:sent': obj({ moveId: text(100), screwId: text(100), stage, raiseUm: num, turns: num, degrees: num, recommended: z.boolean({ error: 'must be true or false' }), note: text(2000).optional() }),
  'move:answered': z.discriminatedUnion(
    'outcome',
    [obj({ moveId: text(100), outcome: z.literal('done'), turns: num, raiseUm: num }), obj({ moveId: text(100), outcome: z.literal('cannot'), reason: text(2000) })],
    { error: 'must be "done" or "cannot"' },
  ),
  'note:posted': obj({ text: text(10_000) }),
  'photo:attached': obj({ photoId: text(100), stage, caption: text(1000), contentType: text(100), bytes: num, key: text(500), thumbKey: text(500).nullable() }),
  'session:ended': obj({ reason: text(2000).optional() }),
  'review:commented': obj({ atSeq: z.int({ error: 'must be a whole number' }).min(0, 'must be 0 or more'), text: text(10_000) }),
  'review:returned': obj({ reasons: z.array(text(2000)).max(100, 'at most 100 reasons') }),
  'session:resumed': obj({ note: text(2000).optional() }),
  'review:approved': obj({
    name: text(300),
    signature: obj({ width: num, height: num, strokes: z.array(z.array(num)).max(1000, 'at most 1000 strokes') }),
  }),
} satisfies Record<EventType, z.ZodType>;

const eventOf = <T extends EventType>(type: T) =>
  obj({
    sessionId: lowerUuid,
    seq: z.int({ error: 'must be a whole number' }).min(1, 'must be 1 or more'),
    id: lowerUuid,
    type: z.literal(type),
    payload: payloads[type],
    actorId: lowerUuid.nullable(),
    actorRole: text(50),
    clientTs: z.iso
      .datetime({ offset: true, error: 'must be an ISO time or null' })
      .refine((t) => !t.startsWith('0000'), 'must be an ISO time from year 1, or null')
      .nullable(),
    serverTs: serverTime,
    prevHash: z.string({ error: 'must be text' }).regex(/^(|[0-9a-f]{64})$/, 'must be empty or 64 hex digits'),
    hash: z.string({ error: 'must be text' }).regex(/^[0-9a-f]{64}$/, 'must be 64 hex digits'),
  });

const [firstType, ...otherTypes] = EVENT_TYPES;
const sessionEvent = z.discriminatedUnion('type', [eventOf(firstType), ...otherTypes.map(eventOf)], {
  error: `must be one of the event types ${EVENT_TYPES.join(', ')}`,
});

/** Most events a file may hold (a 20,000-event session is large; this leaves room). */
export const MAX_FILE_EVENTS = 200_000;

/** The shape of an export file (version 1). */
export const sessionFileSchema = z
  .looseObject({
    format: z.literal(SESSION_FILE_FORMAT, { error: `must be "${SESSION_FILE_FORMAT}"` }),
    version: z.literal(SESSION_FILE_VERSION, { error: `must be ${SESSION_FILE_VERSION} (the version this Levelwire reads)` }),
    exportedAt: z.string({ error: 'must be an ISO time' }).optional(),
    session: z.looseObject({ id: lowerUuid }, { error: 'must be the session header of the export' }),
    events: z
      .array(sessionEvent, { error: 'must be the list of the session’s events' })
      .min(1, 'must hold at least the opening event')
      .max(MAX_FILE_EVENTS, `must hold at most ${MAX_FILE_EVENTS} events`),
  })
  .superRefine((f, ctx) => {
    const i = f.events.findIndex((e) => e.sessionId !== f.session.id);
    if (i >= 0) ctx.addIssue({ code: 'custom', path: ['events', i, 'sessionId'], message: 'must be the session’s id (session.id)' });
  });

/** Why a file was refused: the path at fault, and for a broken chain the first bad event. */
export type FileProblem = {
  field: string | undefined;
  message: string;
  /** The first bad event of a broken chain (its seq and type, and why), when that is the problem. */
  brokenEvent?: { index: number; seq: number; type: string; reason: string };
};

export type CheckedFile =
  | { ok: true; file: SessionFile; state: SessionState; head: { seq: number; hash: string }; count: number }
  | { ok: false; problem: FileProblem };

const seqAt = (raw: unknown, index: number): unknown => {
  const events = (raw as { events?: unknown })?.events;
  return Array.isArray(events) ? (events[index] as { seq?: unknown } | undefined)?.seq : undefined;
};

/**
 * Checks an export file: its shape (the first problem, naming its path, and the event's seq where it is an event),
 * then its hash chain from seq 1 (the first bad event: its seq, type and why), then that it opens with
 * `session:opened`. On success the file is the caller's object unchanged, with the folded state and the chain's head.
 */
export function checkSessionFile(raw: unknown): CheckedFile {
  const parsed = sessionFileSchema.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    if (issue.path.length === 0) return { ok: false, problem: { field: 'file', message: 'file: not a Levelwire session export (an object with format, version, session and events)' } };
    const field = issue.path.map(String).join('.');
    const seq = issue.path[0] === 'events' && typeof issue.path[1] === 'number' ? seqAt(raw, issue.path[1]) : undefined;
    const where = `${field}${typeof seq === 'number' ? ` (event seq ${seq})` : ''}: `;
    return { ok: false, problem: { field, message: `${where}${issue.message}` } };
  }
  // Stored as the file has it: the parsed copy may differ in ways the hash would see.
  const file = raw as SessionFile;
  // PostgreSQL's jsonb holds no NUL character; Levelwire never writes one, so a file with one was not written by it.
  const nul = file.events.findIndex((e) => JSON.stringify(e.payload).includes('\\u0000'));
  if (nul >= 0) return { ok: false, problem: { field: `events.${nul}.payload`, message: `events.${nul}.payload (event seq ${file.events[nul]!.seq}): holds a NUL character` } };
  const verdict = verifyChain(file.events);
  if (!verdict.ok) {
    // verifyChain stops at the first seq out of order or, before that, at the first link whose hash fails.
    const outOfOrder = file.events.findIndex((e, i) => e.seq !== i + 1);
    const index = outOfOrder >= 0 && verdict.reason.startsWith('expected seq') ? outOfOrder : verdict.brokenAtSeq - 1;
    const type = file.events[index]?.type ?? 'unknown';
    return {
      ok: false,
      problem: {
        field: `events.${index}`,
        message: `The file has been changed: event seq ${verdict.brokenAtSeq} (${type}): ${verdict.reason}`,
        brokenEvent: { index, seq: verdict.brokenAtSeq, type, reason: verdict.reason },
      },
    };
  }
  if (file.events[0]!.type !== 'session:opened') {
    return { ok: false, problem: { field: 'events.0.type', message: 'events.0.type (event seq 1): a session’s log begins with session:opened' } };
  }
  return { ok: true, file, state: foldEvents(file.events), head: { seq: file.events.length, hash: verdict.head }, count: verdict.count };
}
