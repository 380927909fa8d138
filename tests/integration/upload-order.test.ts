// Upload and import routes refuse a caller without the permission before reading the body (issue 7): the answer to
// a wrong role is 403 whatever the body holds, where reading first answered the body's problem (400) instead.
import { request } from 'node:http';
import { Readable } from 'node:stream';
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

beforeAll(async () => {
  org = await makeOrganisation(db, 'Upload order');
  admin = await signInOverHttp(org.users.admin.email);
  technician = await signInOverHttp(org.users.technician.email);
});

const machineCount = async () => (await db.select({ n: count() }).from(machines).where(eq(machines.organisationId, org.organisationId)))[0]!.n;

/**
 * One request on a connection of its own (node:http, no keep-alive): a server that answers without reading a body
 * closes the connection, which a pooled client would otherwise reuse. A string goes with its content-length, an
 * iterable of chunks without one (chunked), so only reading it finds its size.
 */
function send(method: string, path: string, cookie: string, body: string | Iterable<Uint8Array>, contentType: string) {
  const length = typeof body === 'string' ? { 'content-length': String(Buffer.byteLength(body)) } : {};
  return new Promise<{ status: number; json: Record<string, unknown> }>((resolve, reject) => {
    let answered = false;
    const req = request(`${APP_URL}${path}`, { method, agent: false, headers: { cookie, 'content-type': contentType, ...length } }, (res) => {
      answered = true;
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => {
        let json: Record<string, unknown> = {};
        try {
          json = JSON.parse(Buffer.concat(chunks).toString('utf8')) as Record<string, unknown>;
        } catch {}
        resolve({ status: res.statusCode ?? 0, json });
      });
    });
    // The server may answer and close before the whole body is sent; once it has answered, the answer is what counts.
    req.on('error', (e) => (answered ? undefined : reject(e)));
    Readable.from(typeof body === 'string' ? [body] : body).pipe(req);
  });
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
    expect(await send('POST', '/api/machines/import', admin, 'x'.repeat(SIX_MB), 'text/csv')).toMatchObject({ status: 400, json: { code: 'bad_request:import', field: 'file' } });
    expect(await send('POST', '/api/machines/import', admin, chunksOf(SIX_MB), 'text/csv')).toMatchObject({ status: 400, json: { code: 'bad_request:import', field: 'file' } });
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
});
