// Bad input, fuzzed (issue 7, item 3): fast-check makes malformed bodies, queries, path ids, uploads and socket
// payloads from valid ones for every route and command, and each must be refused with a 4xx problem (an error ack on a
// socket) naming the field at fault, with nothing stored and the server still healthy. Real server, real database.
import { randomUUID } from 'node:crypto';
import fc from 'fast-check';
import { fileTypeFromBuffer } from 'file-type';
import Papa from 'papaparse';
import sharp from 'sharp';
import { io } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { footprintTemplate } from '@/lib/fleet/footprint';
import { CSV_COLUMNS, parseMachinesCsv } from '@/lib/fleet/machines-csv';
import { commands, PROTOCOL_VERSION, SOCKET_PATH, type CommandName } from '@/lib/realtime/contract';
import { SESSION_STAGES } from '@/lib/session/stages';
import { checkSessionFile } from '@/lib/session/transfer';
import { UPLOAD_TYPES } from '@/lib/storage';
import { contentTypes, DeepNest, EDGE_NUMBERS, jsonText, malformedIds, materialise, mutationsOf, nonJsonBodies, NUMBERISH_STRINGS, withSummary, type Case } from './bad-input/mutate';
import { accepts, BODY_TARGETS, PATH_TARGETS, pathOf, QUERY_TARGETS, RESERVED_SEGMENTS, segmentsFor } from './bad-input/targets';
import { fingerprint, makeWorld, type World } from './bad-input/world';
import { testDb } from './helpers/fixtures';
import { APP_URL } from './helpers/http';
import type { TestSocket } from './helpers/realtime';

/** Fixed, so a failure replays; fast-check prints it with the failing case's path. Each test adds its name's hash. */
const SEED = 70_003;
/** Cases per route or command: modest, the file runs inside `npm test`. */
const RUNS = { body: 14, path: 4, query: 6, upload: 14, socket: 14 };
const TIMEOUT = 90_000;

const db = testDb();
let w: World;
const sockets: TestSocket[] = [];

type Answer = { status: number; contentType: string; json: Record<string, unknown> | null; text: string };

/** One request as sent, with whatever body and content type the case calls for. */
async function send(method: string, path: string, init: { cookie?: string; body?: string | Uint8Array | FormData; contentType?: string } = {}): Promise<Answer> {
  const headers: Record<string, string> = {};
  if (init.cookie) headers.cookie = init.cookie;
  if (init.contentType !== undefined) headers['content-type'] = init.contentType;
  const res = await fetch(`${APP_URL}${path}`, { method, headers, body: init.body as BodyInit | undefined });
  const text = await res.text();
  let json: Record<string, unknown> | null = null;
  try {
    json = JSON.parse(text) as Record<string, unknown>;
  } catch {
    json = null;
  }
  return { status: res.status, contentType: res.headers.get('content-type') ?? '', json, text };
}

/** Whether `field` names `expected` or a field inside it (a union's discriminator inside the replaced value, say). */
const names = (field: unknown, expected: string) => field === expected || (typeof field === 'string' && field.startsWith(`${expected}.`));

/**
 * A refusal as Levelwire's error vocabulary gives it: a 4xx (400 when given), `application/problem+json` with its
 * code, status and a detail free of internals, naming `field` when one field is at fault.
 */
function expectRefused(res: Answer, field: string | string[] | undefined, status: number | null = 400): void {
  const where = `${res.status} ${res.text.slice(0, 300)}`;
  expect(res.status, where).toBeGreaterThanOrEqual(400);
  expect(res.status, where).toBeLessThan(500);
  if (status !== null) expect(res.status, where).toBe(status);
  expect(res.contentType, where).toMatch(/^application\/problem\+json/);
  const body = res.json ?? {};
  expect(body, where).toMatchObject({ status: res.status, code: expect.stringMatching(/^[a-z_]+:[a-z_]+$/), title: expect.any(String), type: expect.any(String) });
  expect(typeof body.detail === 'string' && body.detail.length > 0, where).toBe(true);
  expect(String(body.detail), where).not.toMatch(/\n\s+at |node_modules|\.ts:\d+/);
  if (field !== undefined) {
    const wanted = Array.isArray(field) ? field : [field];
    expect(wanted.some((f) => names(body.field, f)), `${where}: must name ${wanted.join(' or ')}`).toBe(true);
  }
}

/** Runs a case and checks that the organisation's rows are unchanged and the server answers its health check. */
async function leavesNoTrace<T>(run: () => Promise<T>): Promise<T> {
  const before = await fingerprint(db, w.organisationId);
  const out = await run();
  expect(await fingerprint(db, w.organisationId), 'a refused payload changed stored rows').toEqual(before);
  const health = await fetch(`${APP_URL}/api/health`);
  expect(health.status, 'the server is unhealthy after the case').toBe(200);
  return out;
}

/** The running test's own fixed seed: routes fuzzed with one seed would all get the same sequence of faults. */
const seedOfTest = () => [...(expect.getState().currentTestName ?? '')].reduce((h, c) => (Math.imul(h, 31) + c.charCodeAt(0)) | 0, SEED);

const property = <T>(arb: fc.Arbitrary<T>, check: (t: T) => Promise<void>, numRuns: number) =>
  fc.assert(
    fc.asyncProperty(arb, async (t) => {
      await leavesNoTrace(() => check(t));
    }),
    { seed: seedOfTest(), numRuns },
  );

/** What the server reads as the body: the JSON text of the case, parsed back (so the judge sees what the route sees). */
const asSent = (c: Case) => JSON.parse(jsonText(c.value)) as unknown;
const uuid = z.uuid();

let png: Uint8Array;
const pdf = new TextEncoder().encode('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');

type FilePart = { bytes: Uint8Array; name: string; type: string } | { text: string } | undefined;
function form(fields: Record<string, string | undefined>, file: FilePart): FormData {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) if (v !== undefined) f.append(k, v);
  if (file && 'text' in file) f.append('file', file.text);
  else if (file) f.append('file', new Blob([file.bytes as BlobPart], { type: file.type }), file.name);
  return f;
}
const validPhotoFields = () => ({ id: randomUUID(), stage: 'prepare', caption: 'Anchor bolt, rear left' });
const photoForm = () => form(validPhotoFields(), { bytes: png, name: 'bolt.png', type: 'image/png' });
const certificateForm = () => form({}, { bytes: pdf, name: 'certificate.pdf', type: 'application/pdf' });

beforeAll(async () => {
  png = new Uint8Array(await sharp({ create: { width: 16, height: 12, channels: 3, background: '#7a8a99' } }).png().toBuffer());
  w = await makeWorld(db);
}, 120_000);

afterAll(() => {
  for (const s of sockets) s.disconnect();
});

describe('JSON bodies', () => {
  for (const target of BODY_TARGETS) {
    it(
      `${target.name}: malformed bodies are a 400 naming the field, nothing stored`,
      async () => {
        const { path, valid } = target.make(w);
        for (const v of valid) expect(accepts(target.schema, v), `the valid payload ${JSON.stringify(v)}`).toBe(true);
        const cookie = target.as ? w.cookies[target.as] : undefined;
        const malformed = fc.oneof(...valid.map((v) => mutationsOf(v))).filter((c) => c.hostile !== undefined || !accepts(target.schema, asSent(c)));
        const notJson = fc.oneof(...valid.map((v) => nonJsonBodies(v))).filter((b) => {
          const text = typeof b.text === 'string' ? b.text : new TextDecoder().decode(b.text);
          if (path.endsWith('/report/send') && text.trim() === '') return false; // an empty body is every default
          try {
            return !accepts(target.schema, JSON.parse(text));
          } catch {
            return true;
          }
        });
        const method = target.name.split(' ')[0]!;
        await property(
          fc.oneof({ weight: 4, arbitrary: fc.tuple(malformed, contentTypes) }, { weight: 1, arbitrary: notJson }),
          async (c) => {
            if (Array.isArray(c)) {
              const [bad, contentType] = c;
              expectRefused(await send(method, path, { cookie, body: jsonText(bad.value), contentType }), bad.field);
            } else {
              expectRefused(await send(method, path, { cookie, body: c.text, contentType: c.contentType }), undefined);
            }
          },
          RUNS.body,
        );
      },
      TIMEOUT,
    );
  }
});

describe('ids in the path', () => {
  for (const target of PATH_TARGETS) {
    const params = [...target.route.matchAll(/\[(\w+)\]/g)].map((m) => m[1]!);
    it(
      `${target.method} ${target.route}: a malformed ${params.join(' or ')} is a ${target.names ? '400 naming it' : '4xx'}, nothing stored`,
      async () => {
        const cookie = w.cookies[target.as];
        const valid = segmentsFor(target.route, w);
        const body = target.body?.(w);
        const cases = fc
          .tuple(fc.constantFrom(...params), malformedIds(RESERVED_SEGMENTS))
          .filter(([, id]) => !uuid.safeParse(id).success)
          .map(([param, id]) => withSummary({ what: `${param} = ${JSON.stringify(id.length > 60 ? `${id.slice(0, 60)}…` : id)}`, param, id }));
        await property(
          cases,
          async ({ param, id }) => {
            const path = pathOf(target.route, { ...valid, [param]: id });
            const sent = !body ? {} : 'json' in body ? { body: JSON.stringify(body.json), contentType: 'application/json' } : { body: body.form === 'photo' ? photoForm() : certificateForm() };
            expectRefused(await send(target.method, path, { cookie, ...sent }), target.names ? param : undefined, target.names ? 400 : null);
          },
          RUNS.path,
        );
      },
      TIMEOUT,
    );
  }
});

/** Query values: numbers a careless parser takes, text, long text, damaged ids. */
const queryValue = fc.oneof(
  fc.constantFrom(...NUMBERISH_STRINGS, ...EDGE_NUMBERS.map(String), '1.5', '-0', '2026-13-45', '2026-02-30', '0000-01-01', 'asc;drop', 'ASC', '%', '\u0000'),
  fc.string({ maxLength: 30, unit: 'grapheme' }),
  fc.integer({ min: 201, max: 3_000 }).map((n) => 'q'.repeat(n)),
  malformedIds(),
  // Any text a schema takes, with a NUL character the database cannot store.
  fc.tuple(fc.string({ maxLength: 10 }), fc.string({ maxLength: 10 })).map(([a, b]) => `${a}\u0000${b}`),
);

describe('queries', () => {
  for (const target of QUERY_TARGETS) {
    it(
      `${target.method} ${target.route}: a malformed ${Object.keys(target.valid).join(', ')} is a 400 naming it, nothing stored`,
      async () => {
        expect(accepts(target.schema, target.valid)).toBe(true);
        const path = pathOf(target.route, segmentsFor(target.route, w));
        const cases = fc
          .tuple(fc.constantFrom(...Object.keys(target.valid)), queryValue)
          .filter(([key, value]) => value.includes('\u0000') || !accepts(target.schema, { ...target.valid, [key]: value }))
          .map(([key, value]) => withSummary({ what: `?${key}=${JSON.stringify(value.length > 60 ? `${value.slice(0, 60)}…` : value)}`, key, value }));
        await property(
          cases,
          async ({ key, value }) => {
            const query = new URLSearchParams({ ...target.valid, [key]: value });
            expectRefused(await send(target.method, `${path}?${query}`, { cookie: w.cookies[target.as] }), key);
          },
          RUNS.query,
        );
      },
      TIMEOUT,
    );
  }
});

/** Envelopes a multipart upload route cannot read: not multipart, or multipart that is not a form. */
const badEnvelopes = fc.constantFrom(
  { what: 'a JSON body', body: '{"file":"x"}', contentType: 'application/json' },
  { what: 'no body', body: undefined, contentType: undefined },
  { what: 'plain text', body: 'file=bolt.png', contentType: 'text/plain' },
  { what: 'a url-encoded form', body: 'file=bolt.png&id=1', contentType: 'application/x-www-form-urlencoded' },
  { what: 'multipart without a boundary', body: '--x\r\n\r\n', contentType: 'multipart/form-data' },
  { what: 'multipart that never ends', body: '--x\r\ncontent-disposition: form-data; name="file"; filename="a.png"\r\n\r\n\u0089PNG', contentType: 'multipart/form-data; boundary=x' },
  { what: 'multipart junk', body: 'this is not a multipart body at all', contentType: 'multipart/form-data; boundary=----x' },
);

/** Bytes that are not a photo or a certificate: random, empty, cut short, or a type neither takes. */
const junkFile = (extra: fc.Arbitrary<{ what: string; bytes: Uint8Array }>[] = []) =>
  fc.oneof(
    fc.uint8Array({ minLength: 1, maxLength: 2_048 }).map((bytes) => ({ what: `${bytes.length} random bytes`, bytes })),
    fc.constant({ what: 'an empty file', bytes: new Uint8Array() }),
    fc.constant({ what: 'a GIF', bytes: new TextEncoder().encode('GIF89a\u0001\u0000\u0001\u0000\u0000\u0000\u0000;') }),
    fc.constant({ what: 'an HTML page', bytes: new TextEncoder().encode('<!doctype html><script>alert(1)</script>') }),
    ...extra,
  );

async function detected(bytes: Uint8Array): Promise<string | undefined> {
  return bytes.byteLength === 0 ? undefined : (await fileTypeFromBuffer(bytes))?.mime;
}

describe('uploads', () => {
  it(
    'POST /api/sessions/:id/photos: a bad field, file or envelope is a 400 naming it, nothing stored',
    async () => {
      const path = `/api/sessions/${w.liveSessionId}/photos`;
      const file = (bytes: Uint8Array) => ({ bytes, name: 'bolt.png', type: 'image/png' });
      type PhotoCase = { what: string; field: string; fields: Record<string, string | undefined>; file: FilePart; envelope?: { body?: string; contentType?: string } };
      const fieldFaults: fc.Arbitrary<PhotoCase> = fc.oneof(
        malformedIds()
          .filter((id) => !uuid.safeParse(id).success)
          .map((id) => ({ what: `id = ${JSON.stringify(id.slice(0, 60))}`, field: 'id', fields: { ...validPhotoFields(), id }, file: file(png) })),
        fc.constant({ what: 'no id', field: 'id', fields: { ...validPhotoFields(), id: undefined }, file: file(png) }),
        fc
          .string({ maxLength: 30, unit: 'grapheme' })
          .filter((s) => !(SESSION_STAGES as readonly string[]).includes(s))
          .map((stage) => ({ what: `stage = ${JSON.stringify(stage)}`, field: 'stage', fields: { ...validPhotoFields(), stage }, file: file(png) })),
        fc.constant({ what: 'no stage', field: 'stage', fields: { ...validPhotoFields(), stage: undefined }, file: file(png) }),
        fc
          .tuple(fc.string({ minLength: 1, maxLength: 4, unit: 'grapheme' }), fc.integer({ min: 201, max: 50_000 }))
          .map(([c, n]) => `${c}${'x'.repeat(n)}`)
          .map((caption) => ({ what: `a ${caption.length}-character caption`, field: 'caption', fields: { ...validPhotoFields(), caption }, file: file(png) })),
        fc.constant({ what: 'a caption with a NUL character', field: 'caption', fields: { ...validPhotoFields(), caption: 'Anchor\u0000bolt' }, file: file(png) }),
      );
      const fileFaults: fc.Arbitrary<PhotoCase> = fc.oneof(
        fc.constant({ what: 'no file', field: 'file', fields: validPhotoFields(), file: undefined }),
        fc.string({ maxLength: 40 }).map((text) => ({ what: `file as text ${JSON.stringify(text)}`, field: 'file', fields: validPhotoFields(), file: { text } })),
        junkFile([
          fc.integer({ min: 8, max: 40 }).map((n) => ({ what: `a PNG cut after ${n} bytes`, bytes: png.slice(0, n) })),
          fc.constant({ what: 'a PDF', bytes: pdf }),
        ]).map(({ what, bytes }) => ({ what, field: 'file', fields: validPhotoFields(), file: file(bytes) })),
      );
      const envelopes: fc.Arbitrary<PhotoCase> = badEnvelopes.map((e) => ({ what: e.what, field: 'file', fields: {}, file: undefined, envelope: e }));
      await property(
        fc.oneof(fieldFaults, fileFaults, envelopes).map(withSummary),
        async (c) => {
          const sent = c.envelope ?? { body: form(c.fields, c.file) };
          expectRefused(await send('POST', path, { cookie: w.cookies.technician, ...sent }), c.field);
        },
        RUNS.upload,
      );
    },
    TIMEOUT,
  );

  it(
    'PUT /api/instruments/:id/certificate: a missing or unreadable file, or a bad envelope, is a 400 naming the file, nothing stored',
    async () => {
      const path = `/api/instruments/${w.instrumentId}/certificate`;
      type CertCase = { what: string; body?: string | FormData; contentType?: string; bytes?: Uint8Array };
      const cases: fc.Arbitrary<CertCase> = fc.oneof(
        fc.constant({ what: 'no file', body: form({ note: 'x' }, undefined) }),
        fc.string({ maxLength: 40 }).map((text) => ({ what: `file as text ${JSON.stringify(text)}`, body: form({}, { text }) })),
        junkFile().map(({ what, bytes }) => ({ what, bytes, body: form({}, { bytes, name: 'certificate.pdf', type: 'application/pdf' }) })),
        badEnvelopes.map((e) => ({ what: e.what, body: e.body, contentType: e.contentType })),
      );
      await property(
        cases.map(withSummary),
        async (c) => {
          // A certificate is judged by its bytes alone: random bytes that happen to open like a PDF or an image are one.
          const mime = c.bytes && (await detected(c.bytes));
          fc.pre(!mime || !(mime in UPLOAD_TYPES));
          expectRefused(await send('PUT', path, { cookie: w.cookies.admin, body: c.body, contentType: c.contentType }), 'file');
        },
        RUNS.upload,
      );
    },
    TIMEOUT,
  );

  it(
    'POST /api/machines/import: a bad cell is a 400 naming its column, a file that is no machine CSV a 400 naming what is missing; nothing stored',
    async () => {
      const customer = w.customer.name;
      const siteName = w.site.name;
      const siteIdFor = (c: string, s: string) => (c.trim() === customer && s.trim() === siteName ? w.site.id : undefined);
      const serial = `BI-CSV-${randomUUID().slice(0, 8)}`;
      const rows: Record<string, string>[] = footprintTemplate(4, 1600, 1200).map((s) => ({
        serial,
        model: 'Bad input VMC',
        customer,
        site: siteName,
        table_length_mm: '1000',
        table_width_mm: '500',
        travel_x_mm: '800',
        travel_y_mm: '500',
        travel_z_mm: '500',
        check_interval_months: '12',
        prior_leveled_on: '2026-03-01',
        screw_label: s.label,
        screw_kind: s.kind,
        screw_x_mm: String(s.xMm),
        screw_y_mm: String(s.yMm),
        thread_unit: 'mm',
        thread_value: '3',
        lift_per_turn_mm: '',
        spec_height_mm: '',
      }));
      const csv = (data: Record<string, string>[], fields: readonly string[] = CSV_COLUMNS) => Papa.unparse({ fields: [...fields], data: data.map((r) => fields.map((f) => r[f] ?? '')) }, { newline: '\r\n' });
      expect(parseMachinesCsv(csv(rows), siteIdFor).ok).toBe(true);
      const cell = fc.oneof(
        fc.constantFrom('', ' ', 'abc', 'NaN', 'Infinity', '-Infinity', '1e999', '=1+1', '"', '\n', 'null', '0', '-1', '1,5', 'tpi', 'mm', 'corner', '0000-01-01', '2026-02-30'),
        fc.string({ maxLength: 20, unit: 'grapheme' }),
        fc.constantFrom(...EDGE_NUMBERS.map(String)),
        fc.integer({ min: 121, max: 5_000 }).map((n) => 'x'.repeat(n)),
      );
      /** The column a bad cell is reported under: the site is found by customer and site name together. */
      const reported = (column: string): string[] =>
        column === 'customer' ? ['site'] : column === 'serial' ? ['serial', 'footprint'] : column === 'screw_x_mm' || column === 'screw_y_mm' ? [column, 'footprint'] : [column];
      type CsvCase = { what: string; text: string; field: string[] | undefined; contentType: string; hostile?: true };
      const cellFaults: fc.Arbitrary<CsvCase> = fc
        .tuple(fc.integer({ min: 0, max: rows.length - 1 }), fc.constantFrom(...CSV_COLUMNS), cell)
        .map(([row, column, value]) => ({
          what: `line ${row + 2}, ${column} = ${JSON.stringify(value.length > 40 ? `${value.slice(0, 40)}…` : value)}`,
          text: csv(rows.map((r, i) => (i === row ? { ...r, [column]: value } : r))),
          field: reported(column),
          contentType: 'text/csv',
        }));
      const nulCell: fc.Arbitrary<CsvCase> = fc.tuple(fc.integer({ min: 0, max: rows.length - 1 }), fc.constantFrom(...CSV_COLUMNS)).map(([row, column]) => ({
        what: `line ${row + 2}, ${column} holds a NUL character`,
        text: csv(rows.map((r, i) => (i === row ? { ...r, [column]: `${r[column]}\u0000` } : r))),
        field: ['file'],
        contentType: 'text/csv',
        hostile: true,
      }));
      const fileFaults: fc.Arbitrary<CsvCase> = fc.oneof(
        fc.constantFrom(...CSV_COLUMNS).map((column): CsvCase => ({ what: `no ${column} column`, text: csv(rows, CSV_COLUMNS.filter((c) => c !== column)), field: [column], contentType: 'text/csv' })),
        fc.constant<CsvCase>({ what: 'only the header', text: csv([]), field: ['row'], contentType: 'text/csv' }),
        fc.constant({ what: 'an empty file', text: '', field: undefined, contentType: 'text/csv' }),
        fc.constant({ what: 'no header', text: csv(rows).split('\r\n').slice(1).join('\r\n'), field: undefined, contentType: 'text/csv' }),
        fc.constant({ what: 'the CSV as a multipart upload', text: `--x\r\ncontent-disposition: form-data; name="file"; filename="m.csv"\r\n\r\n${csv(rows)}\r\n--x--\r\n`, field: undefined, contentType: 'multipart/form-data; boundary=x' }),
        fc.constant({ what: 'JSON', text: JSON.stringify(rows), field: undefined, contentType: 'application/json' }),
        fc.string({ minLength: 1, maxLength: 200, unit: 'grapheme' }).map((text) => ({ what: `text ${JSON.stringify(text.slice(0, 40))}`, text, field: undefined, contentType: 'text/csv' })),
      );
      await property(
        fc
          .oneof({ weight: 3, arbitrary: cellFaults }, { weight: 1, arbitrary: nulCell }, { weight: 1, arbitrary: fileFaults })
          .filter((c) => c.hostile || !parseMachinesCsv(c.text, siteIdFor).ok)
          .map(withSummary),
        async (c) => {
          const res = await send('POST', '/api/machines/import', { cookie: w.cookies.admin, body: c.text, contentType: c.contentType });
          expectRefused(res, c.field);
          expect(res.json?.field, 'a refused file names where').toEqual(expect.any(String));
        },
        RUNS.upload,
      );
    },
    TIMEOUT,
  );

  it(
    'POST /api/sessions/import: a changed or malformed file is a 400 naming the path at fault (or the event whose link breaks), nothing stored',
    async () => {
      // A client time on the last event (outside the hash chain), so that it too is fuzzed.
      const events = w.exportFile.events as Record<string, unknown>[];
      const base = { ...w.exportFile, events: events.map((e, i) => (i === events.length - 1 ? { ...e, clientTs: '2026-12-01T10:00:00.000Z' } : e)) };
      expect(checkSessionFile(base).ok, 'the export the import starts from').toBe(true);
      // A header's exportedAt is never stored: in year 0000 it is harmless, and the file is then simply one already here.
      const malformed = mutationsOf(base).filter((c) => c.hostile === 'nul' || !checkSessionFile(asSent(c)).ok);
      const notJson = nonJsonBodies({ format: 'levelwire-session' });
      /** The path itself, a field inside it, or the event it lies in when the change shows only in the hash chain. */
      const atFault = (field: unknown, path: string) => {
        if (typeof field !== 'string') return false;
        if (names(field, path)) return true;
        const event = /^events\.\d+(\.payload)?$/.test(field) && path.startsWith(`${field}.`);
        const header = path.startsWith('session.') && /^events\.\d+\.sessionId$/.test(field);
        return event || header;
      };
      await property(
        fc.oneof({ weight: 4, arbitrary: malformed }, { weight: 1, arbitrary: notJson }),
        async (c) => {
          if ('value' in c) {
            const res = await send('POST', '/api/sessions/import', { cookie: w.cookies.admin, body: jsonText(c.value), contentType: 'application/json' });
            expectRefused(res, undefined);
            if (c.field !== undefined) expect(atFault(res.json?.field, c.field), `${res.json?.field} for ${c.field}`).toBe(true);
            else expect(res.json?.field).toBe('file');
          } else {
            const res = await send('POST', '/api/sessions/import', { cookie: w.cookies.admin, body: c.text, contentType: c.contentType });
            expectRefused(res, 'file');
          }
        },
        RUNS.upload,
      );
    },
    TIMEOUT,
  );
});

/** A socket of a person of the world's organisation, on the running server. */
async function socketOf(role: keyof World['cookies']): Promise<TestSocket> {
  const socket: TestSocket = io(APP_URL, { path: SOCKET_PATH, auth: { protocol: PROTOCOL_VERSION }, extraHeaders: { cookie: w.cookies[role] }, transports: ['websocket'], reconnection: false, forceNew: true });
  sockets.push(socket);
  await new Promise<void>((resolve, reject) => {
    socket.once('connect', () => resolve());
    socket.once('connect_error', reject);
  });
  return socket;
}

type Ack = { ok: boolean; error?: { code: string; message: string; field?: string } };

/** Sends a command with any arguments and waits for its acknowledgement (a missing one fails the case). */
async function emit(socket: TestSocket, name: string, args: unknown[]): Promise<Ack> {
  return (await (socket.timeout(10_000) as unknown as { emitWithAck: (n: string, ...a: unknown[]) => Promise<Ack> }).emitWithAck(name, ...args)) as Ack;
}

let rawAckId = 900_000;
/**
 * Sends a command whose payload is JSON text as written, in socket.io's own packet (`2<ack id>["name",payload]`), and
 * waits for the server's `3<ack id>[answer]`: the client's encoder cannot write a value thousands deep, a client of
 * another make can.
 */
function emitRaw(socket: TestSocket, name: string, payloadJson: string): Promise<Ack> {
  const id = rawAckId++;
  const engine = socket.io.engine;
  return new Promise((resolve, reject) => {
    const onPacket = (packet: { type: string; data?: unknown }) => {
      if (packet.type !== 'message' || typeof packet.data !== 'string' || !packet.data.startsWith(`3${id}[`)) return;
      clearTimeout(timer);
      engine.off('packet', onPacket);
      resolve((JSON.parse(packet.data.slice(`3${id}`.length)) as Ack[])[0]!);
    };
    const timer = setTimeout(() => {
      engine.off('packet', onPacket);
      reject(new Error(`no acknowledgement for ${name} within 10 s`));
    }, 10_000);
    engine.on('packet', onPacket);
    engine.write(`2${id}[${JSON.stringify(name)},${payloadJson}]`);
  });
}

const holdsBinary = (v: unknown): boolean =>
  ArrayBuffer.isView(v) || (Array.isArray(v) ? v.some(holdsBinary) : v !== null && typeof v === 'object' && !(v instanceof DeepNest) && Object.values(v).some(holdsBinary));

describe('socket commands', () => {
  const bases = (w: World): Record<CommandName, unknown[]> => {
    const base = { id: randomUUID(), sessionId: w.liveSessionId, clientTs: '2026-12-01T10:00:00+01:00' };
    return {
      'session:join': [{ sessionId: w.liveSessionId, afterSeq: 0 }],
      'session:leave': [{ sessionId: w.liveSessionId }],
      'link:ping': [{ sessionId: w.liveSessionId, rttMs: 12 }],
      'reading:submit': [
        { ...base, reading: { kind: 'level', stage: 'zero-level', axis: 'x', positionMm: 120, divisions: 1.5 } },
        { ...base, reading: { kind: 'sweep', stage: 'spindle-sweep', diameterMm: 254, frontUm: 3, backUm: -2, leftUm: 1, rightUm: 0 } },
      ],
      'stage:enter': [{ ...base, stage: 'twist' }],
      'check:mark': [{ ...base, stage: 'prepare', item: 'Anchor bolts loosened', done: true }],
      'move:send': [{ ...base, stage: 'rough-level', screwId: w.screwIds[1], turns: 0.5, recommended: true, note: 'Quarter turn up' }],
      'move:answer': [
        { ...base, moveId: w.moveId, outcome: 'done', turns: 0.25 },
        { ...base, moveId: w.moveId, outcome: 'cannot', reason: 'The screw is seized' },
      ],
      'note:post': [{ ...base, text: 'Waiting for the slab to settle' }],
      'session:end': [{ ...base, reason: 'Levelled within tolerance' }],
    };
  };
  /** Binary where JSON goes: socket.io carries it as an attachment and the handler sees a Buffer. */
  const binary = fc.uint8Array({ minLength: 0, maxLength: 64 }).map((b) => Buffer.from(b));

  for (const name of Object.keys(commands) as CommandName[]) {
    it(
      `${name}: a malformed payload is an error ack naming the field, nothing stored, the socket still answers`,
      async () => {
        const valid = bases(w)[name];
        for (const v of valid) expect(accepts(commands[name], v), `the valid payload ${JSON.stringify(v)}`).toBe(true);
        const socket = await socketOf(name === 'move:send' ? 'expert' : 'technician');
        // JSON payloads go as raw packets (any depth); binary ones and odd argument lists through the client.
        type SocketCase = { what: string; field: string | undefined } & ({ json: string } | { args: unknown[] });
        const malformed: fc.Arbitrary<SocketCase> = fc
          .oneof(...valid.map((v) => mutationsOf(v, { junk: binary, extra: [Buffer.from('x')] })))
          .filter((c) => c.hostile !== undefined || !accepts(commands[name], materialise(c.value)))
          .map((c) => (holdsBinary(c.value) ? { what: c.what, args: [materialise(c.value)], field: c.field } : { what: c.what, json: jsonText(c.value), field: c.field }));
        const shapes: fc.Arbitrary<SocketCase> = fc.constantFrom(
          { what: 'no payload', args: [], field: undefined },
          { what: 'undefined', args: [undefined], field: undefined },
          { what: 'the payload as JSON text', args: [JSON.stringify(valid[0])], field: undefined },
          { what: 'an empty object and an extra argument', args: [{}, 'extra'], field: undefined },
        );
        await property(
          fc.oneof({ weight: 6, arbitrary: malformed }, { weight: 1, arbitrary: shapes }).map(withSummary),
          async (c) => {
            const ack = 'json' in c ? await emitRaw(socket, name, c.json) : await emit(socket, name, c.args);
            expect(ack, c.what).toMatchObject({ ok: false, error: { code: expect.stringMatching(/^bad_request:/), message: expect.any(String) } });
            if (c.field !== undefined) expect(names(ack.error?.field, c.field), `${ack.error?.field} for ${c.field}`).toBe(true);
            const ping = await emit(socket, 'link:ping', [{ sessionId: w.liveSessionId }]);
            expect(ping, 'the socket answers a valid command after a bad one').toMatchObject({ ok: true });
          },
          RUNS.socket,
        );
        expect(socket.connected).toBe(true);
      },
      TIMEOUT,
    );
  }
});

describe('the checks themselves', () => {
  it('fail on a stored row, a 5xx, a plain-JSON error and an error naming another field', async () => {
    // A valid payload is stored, and the fingerprint sees it: the "nothing stored" check can fail.
    const before = await fingerprint(db, w.organisationId);
    const created = await send('POST', '/api/customers', { cookie: w.cookies.admin, body: JSON.stringify({ name: 'Stored on purpose' }), contentType: 'application/json' });
    expect(created.status).toBe(201);
    expect(await fingerprint(db, w.organisationId)).not.toEqual(before);
    // A refusal the server really gives passes; the same refusal altered in any one way does not.
    const refused = await send('POST', '/api/customers', { cookie: w.cookies.admin, body: JSON.stringify({ name: 7 }), contentType: 'application/json' });
    expectRefused(refused, 'name');
    expect(() => expectRefused(refused, 'notes')).toThrow();
    expect(() => expectRefused({ ...refused, json: { ...refused.json, field: undefined } }, 'name')).toThrow();
    expect(() => expectRefused({ ...refused, status: 500, json: { ...refused.json, status: 500 } }, 'name', null)).toThrow();
    expect(() => expectRefused({ ...refused, contentType: 'application/json' }, 'name')).toThrow();
    expect(() => expectRefused({ ...refused, json: { ...refused.json, detail: 'TypeError: x\n    at parse (lib/http.ts:20:5)' } }, 'name')).toThrow();
    // A deep value is sent as written: the nesting is real, not a string.
    expect(jsonText({ a: new DeepNest(3, 'array') })).toBe('{"a":[[[]]]}');
  });

  it('see a valid socket command stored, and an ack naming another field', async () => {
    const socket = await socketOf('technician');
    const before = await fingerprint(db, w.organisationId);
    const note = { id: randomUUID(), sessionId: w.liveSessionId, text: 'Stored on purpose' };
    expect(await emitRaw(socket, 'note:post', JSON.stringify(note))).toMatchObject({ ok: true });
    expect(await fingerprint(db, w.organisationId)).not.toEqual(before);
    const refused = await emitRaw(socket, 'note:post', JSON.stringify({ ...note, id: randomUUID(), text: 7 }));
    expect(refused).toMatchObject({ ok: false, error: { field: 'text' } });
    expect(names(refused.error?.field, 'id')).toBe(false);
  });
});
