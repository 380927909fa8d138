// Upload and import routes refuse a caller without the permission before reading the body (issue 7): the answer to
// a wrong role is 403 whatever the body holds, where reading first answered the body's problem (400) instead.
import { connect } from 'node:net';
import { count, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { instruments, machines } from '@/db/schema';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { APP_URL, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
let admin: string;
let technician: string;
const SIX_MB = 6 * 1024 * 1024;
/** Over the 10 MB file cap and its 64 KB multipart envelope. */
const ELEVEN_MB = 11 * 1024 * 1024;
const MULTIPART = 'multipart/form-data; boundary=levelwire-upload-order';

beforeAll(async () => {
  org = await makeOrganisation(db, 'Upload order');
  admin = await signInOverHttp(org.users.admin.email);
  technician = await signInOverHttp(org.users.technician.email);
});

const machineCount = async () => (await db.select({ n: count() }).from(machines).where(eq(machines.organisationId, org.organisationId)))[0]!.n;

/** The status and JSON body of a raw HTTP/1.1 answer (content-length or chunked). */
function parseAnswer(raw: Buffer): { status: number; json: Record<string, unknown> } {
  const headEnd = raw.indexOf('\r\n\r\n');
  if (headEnd < 0) throw new Error(`no whole answer head in ${raw.length} bytes`);
  const head = raw.subarray(0, headEnd).toString('latin1');
  const status = Number(/^HTTP\/1\.[01] (\d{3})/.exec(head)?.[1] ?? 0);
  let body = raw.subarray(headEnd + 4);
  if (/^transfer-encoding:\s*chunked/im.test(head)) {
    const parts: Buffer[] = [];
    for (let at = 0; ; ) {
      const lineEnd = body.indexOf('\r\n', at);
      const size = parseInt(body.subarray(at, lineEnd).toString('latin1'), 16);
      if (!size) break;
      parts.push(body.subarray(lineEnd + 2, lineEnd + 2 + size));
      at = lineEnd + 2 + size + 2;
    }
    body = Buffer.concat(parts);
  }
  let json: Record<string, unknown> = {};
  try {
    json = JSON.parse(body.toString('utf8')) as Record<string, unknown>;
  } catch {}
  return { status, json };
}

/**
 * One request on a raw connection of its own, sent as a careful client sends an upload: a string goes with its
 * content-length, an iterable of chunks without one (chunked), so only reading it finds its size. The client stops
 * offering the body as soon as the server has answered, and waits a moment for an answer before offering any body,
 * since a server that refuses by the declared length answers at once. (node:http's client would keep writing into a
 * connection the server has closed, meet EPIPE, and drop an answer it had already received.) `offered` counts the
 * body's bytes written before the answer came.
 */
async function send(method: string, path: string, cookie: string, body: string | (() => Iterable<Uint8Array>), contentType: string) {
  // A connection reset with no answer read is the transport's race (the client's write met the server's close before
  // the answer was read), not an answer: the request is made again, at most three times in all.
  for (let attempt = 1; ; attempt++) {
    try {
      return await sendOnce(method, path, cookie, typeof body === 'string' ? body : body(), contentType);
    } catch (e) {
      if (attempt >= 3 || !/EPIPE|ECONNRESET/.test(String((e as Error).message))) throw e;
    }
  }
}

function sendOnce(method: string, path: string, cookie: string, body: string | Iterable<Uint8Array>, contentType: string) {
  const url = new URL(`${APP_URL}${path}`);
  const chunked = typeof body !== 'string';
  const head = [
    `${method} ${url.pathname}${url.search} HTTP/1.1`,
    `host: ${url.host}`,
    `cookie: ${cookie}`,
    `content-type: ${contentType}`,
    chunked ? 'transfer-encoding: chunked' : `content-length: ${Buffer.byteLength(body)}`,
    'connection: close',
    '',
    '',
  ].join('\r\n');
  return new Promise<{ status: number; json: Record<string, unknown>; offered: number }>((resolve, reject) => {
    const socket = connect(Number(url.port), url.hostname);
    const received: Buffer[] = [];
    let offered = 0;
    let finished = false;
    const answered = () => received.length > 0;
    const finish = (error?: Error) => {
      if (finished) return;
      finished = true;
      if (!answered()) return reject(error ?? new Error('the connection closed with no answer'));
      try {
        resolve({ ...parseAnswer(Buffer.concat(received)), offered });
      } catch (e) {
        reject(e);
      }
    };
    socket.on('data', (c: Buffer) => received.push(c));
    socket.on('end', () => finish());
    socket.on('close', () => finish());
    // A write into a connection the server closed after answering: the answer already received is what counts.
    socket.on('error', (e) => finish(e));
    const write = (bytes: Uint8Array | string) => new Promise<void>((done) => (socket.write(bytes) ? done() : socket.once('drain', done)));
    const pause = (ms: number) => new Promise<void>((done) => setTimeout(done, ms));
    socket.once('connect', async () => {
      try {
        await write(head);
        // A body of over a megabyte with its length declared: a server checking the length answers before any of it.
        if (!chunked && Buffer.byteLength(body) > 1024 * 1024) for (let waited = 0; waited < 10_000 && !answered() && !finished; waited += 20) await pause(20);
        const pieces: Iterable<Uint8Array> = chunked ? body : chunksOfText(body);
        for (const piece of pieces) {
          if (answered() || finished || socket.destroyed) return;
          await write(chunked ? Buffer.concat([Buffer.from(`${piece.byteLength.toString(16)}\r\n`), piece, Buffer.from('\r\n')]) : piece);
          offered += piece.byteLength;
          // Let an answer that has come in be read before the next piece goes out.
          await new Promise<void>((done) => setImmediate(done));
        }
        if (chunked && !answered() && !finished && !socket.destroyed) await write('0\r\n\r\n');
      } catch (e) {
        finish(e as Error);
      }
    });
  });
}

/** A string's UTF-8 bytes in 64 KB pieces. */
function* chunksOfText(text: string): Generator<Uint8Array> {
  const bytes = Buffer.from(text);
  for (let at = 0; at < bytes.length; at += 64 * 1024) yield bytes.subarray(at, at + 64 * 1024);
}

/** `bytes` of text in 64 KB chunks. */
function* chunksOf(bytes: number): Generator<Uint8Array> {
  for (let left = bytes; left > 0; left -= 64 * 1024) yield new Uint8Array(Math.min(left, 64 * 1024)).fill(0x41);
}

describe('POST /api/machines/import', () => {
  it('a technician is refused (403) before a body over the cap is looked at', async () => {
    const res = await send('POST', '/api/machines/import', technician, 'x'.repeat(SIX_MB), 'text/csv');
    expect(res).toMatchObject({ status: 403, json: { code: 'forbidden:fleet' } });
  });
  it('an admin’s body over 5 MB is a 400 naming the file, by its length or, without one, while reading; nothing stored', async () => {
    const before = await machineCount();
    // By its declared length: refused before a byte of the body is offered.
    expect(await send('POST', '/api/machines/import', admin, 'x'.repeat(SIX_MB), 'text/csv')).toMatchObject({ status: 400, json: { code: 'bad_request:import', field: 'file' }, offered: 0 });
    expect(await send('POST', '/api/machines/import', admin, () => chunksOf(SIX_MB), 'text/csv')).toMatchObject({ status: 400, json: { code: 'bad_request:import', field: 'file' } });
    expect(await machineCount()).toBe(before);
  });
});

describe('PUT /api/instruments/:id/certificate', () => {
  let id: string;
  beforeAll(async () => {
    const [row] = await db
      .insert(instruments)
      .values({ organisationId: org.organisationId, kind: 'indicator', model: 'Upload order indicator', serial: 'UO-1', resolutionUm: 1, rangeMm: 0.8, calibrationDue: '2099-01-01' })
      .returning();
    id = row!.id;
  });

  it('a technician is refused (403) before the body is read, even one that is no upload at all', async () => {
    expect(await send('PUT', `/api/instruments/${id}/certificate`, technician, 'not a form', 'text/plain')).toMatchObject({ status: 403, json: { code: 'forbidden:instrument' } });
  });
  it('an admin’s body that is no upload is a 400 naming the file, and no certificate is stored', async () => {
    expect(await send('PUT', `/api/instruments/${id}/certificate`, admin, 'not a form', 'text/plain')).toMatchObject({ status: 400, json: { field: 'file' } });
    expect((await db.select().from(instruments).where(eq(instruments.id, id)))[0]!.certificateKey).toBeNull();
  });
  it('an admin’s multipart body over the cap with its length declared is a 400 naming the file, before any of it is offered', async () => {
    expect(await send('PUT', `/api/instruments/${id}/certificate`, admin, 'x'.repeat(ELEVEN_MB), MULTIPART)).toMatchObject({ status: 400, json: { field: 'file' }, offered: 0 });
  });
  it('an admin’s multipart body sent chunked without a length is a 400 naming the file once past the cap, while reading', async () => {
    // 256 MB offered without a length: the answer comes once the cap is passed, long before the body ends (reading it
    // all first would answer only after the last chunk).
    const res = await send('PUT', `/api/instruments/${id}/certificate`, admin, () => chunksOf(256 * 1024 * 1024), MULTIPART);
    expect(res).toMatchObject({ status: 400, json: { field: 'file' } });
    expect(res.offered).toBeGreaterThan(10 * 1024 * 1024);
    expect(res.offered).toBeLessThan(64 * 1024 * 1024);
    expect((await db.select().from(instruments).where(eq(instruments.id, id)))[0]!.certificateKey).toBeNull();
  });
});
