import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { instruments } from '@/db/schema';
import { addDays, todayUtc } from '@/lib/dates';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { api, APP_URL, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
const cookies = {} as Record<string, string>;
const today = todayUtc();

const level = (patch: Record<string, unknown> = {}) => ({
  kind: 'level',
  model: 'Fixture precision level 200 mm',
  serial: `LV-${randomUUID().slice(0, 8)}`,
  sensitivityValue: 0.02,
  sensitivityUnit: 'mm/m',
  vialCount: 2,
  calibratedOn: addDays(today, -300),
  calibrationDue: addDays(today, 65),
  ...patch,
});
const indicator = (patch: Record<string, unknown> = {}) => ({
  kind: 'indicator',
  model: 'Fixture lever indicator',
  serial: `TI-${randomUUID().slice(0, 8)}`,
  resolutionUm: 2,
  rangeMm: 0.4,
  calibrationDue: addDays(today, -1),
  ...patch,
});

async function create(body: Record<string, unknown>, cookie = cookies.admin) {
  const res = await api('/api/instruments', { cookie, method: 'POST', body });
  expect(res.status, JSON.stringify(res.json)).toBe(201);
  return res.json.instrument as { id: string; serial: string; status: string; certificate: unknown };
}

async function countInstruments(organisationId: string) {
  return (await db.select({ id: instruments.id }).from(instruments).where(eq(instruments.organisationId, organisationId))).length;
}

/** A multipart upload as a browser sends it. */
async function upload(id: string, bytes: Uint8Array, name: string, cookie = cookies.admin, type = 'application/pdf') {
  const form = new FormData();
  form.set('file', new Blob([bytes as Uint8Array<ArrayBuffer>], { type }), name);
  const res = await fetch(`${APP_URL}/api/instruments/${id}/certificate`, { method: 'PUT', body: form, headers: cookie ? { cookie } : {} });
  return { status: res.status, json: (await res.json().catch(() => ({}))) as Record<string, unknown> };
}

// The smallest bytes each format is recognised by: "%PDF-" (ISO 32000-1 §7.5.2 file header),
// the PNG signature 89 50 4E 47 0D 0A 1A 0A followed by an IHDR chunk (ISO/IEC 15948 §5.2).
const pdf = new TextEncoder().encode('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
const png = Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52, 0, 0, 0, 1, 0, 0, 0, 1, 8, 6, 0, 0, 0, 0x1f, 0x15, 0xc4, 0x89]);

beforeAll(async () => {
  org = await makeOrganisation(db, 'Instruments');
  other = await makeOrganisation(db, 'Elsewhere');
  for (const role of ['technician', 'expert', 'reviewer', 'admin'] as const) cookies[role] = await signInOverHttp(org.users[role].email);
  cookies.outsider = await signInOverHttp(other.users.admin.email);
});

describe('instrument routes', () => {
  it.each([
    ['GET', '/api/instruments'],
    ['POST', '/api/instruments'],
    ['GET', `/api/instruments/${randomUUID()}`],
    ['PATCH', `/api/instruments/${randomUUID()}`],
    ['GET', `/api/instruments/${randomUUID()}/certificate`],
  ])('answers %s %s with 401 when nobody is signed in', async (method, path) => {
    const res = await api(path, { method, body: method === 'GET' ? undefined : {} });
    expect(res.status).toBe(401);
    expect(res.json.code).toBe('unauthorized:auth');
  });

  it('answers an anonymous certificate upload with 401', async () => {
    const res = await upload(randomUUID(), pdf, 'cert.pdf', '');
    expect(res.status).toBe(401);
  });

  it('lets an admin add a level and an indicator, with their calibration status', async () => {
    const lv = await create(level());
    expect(lv.status).toBe('current');
    expect(lv.certificate).toBeNull();
    const ti = await create(indicator());
    expect(ti.status).toBe('expired');
    const got = await api(`/api/instruments/${lv.id}`, { cookie: cookies.technician });
    expect(got.status).toBe(200);
    expect(got.json.instrument).toMatchObject({ kind: 'level', sensitivityValue: 0.02, sensitivityUnit: 'mm/m', resolutionUm: null });
  });

  it.each(['technician', 'expert', 'reviewer'])('refuses a %s adding or changing an instrument with 403', async (role) => {
    const before = await countInstruments(org.organisationId);
    const res = await api('/api/instruments', { cookie: cookies[role], method: 'POST', body: level() });
    expect(res.status).toBe(403);
    expect(res.json.code).toBe('forbidden:instrument');
    expect(await countInstruments(org.organisationId)).toBe(before);
    const lv = await create(level());
    const patch = await api(`/api/instruments/${lv.id}`, { cookie: cookies[role], method: 'PATCH', body: { model: 'changed' } });
    expect(patch.status).toBe(403);
  });

  it.each([
    ['a level without its sensitivity', level({ sensitivityValue: null }), 'sensitivityValue'],
    ['a zero sensitivity', level({ sensitivityValue: 0 }), 'sensitivityValue'],
    ['a negative sensitivity', level({ sensitivityValue: -0.02 }), 'sensitivityValue'],
    ['a sensitivity given as text', level({ sensitivityValue: '0.02' }), 'sensitivityValue'],
    ['an unknown slope unit', level({ sensitivityUnit: 'degrees' }), 'sensitivityUnit'],
    ['an indicator without its range', indicator({ rangeMm: undefined }), 'rangeMm'],
    ['an empty serial', level({ serial: '  ' }), 'serial'],
    ['a due date that is no date', level({ calibrationDue: '2026-02-30' }), 'calibrationDue'],
    ['a due date before the calibration', level({ calibratedOn: addDays(today, 1), calibrationDue: today }), 'calibrationDue'],
    ['an unknown kind', level({ kind: 'laser' }), 'kind'],
  ])('refuses %s with a 400 naming the field, storing nothing', async (_what, body, field) => {
    const before = await countInstruments(org.organisationId);
    const res = await api('/api/instruments', { cookie: cookies.admin, method: 'POST', body });
    expect(res.status).toBe(400);
    expect(res.json.code).toBe('bad_request:instrument');
    expect(res.json.field).toBe(field);
    expect(String(res.json.detail)).toMatch(new RegExp(`^${field}: `));
    expect(await countInstruments(org.organisationId)).toBe(before);
  });

  it('refuses a second level with the same serial with a 409 naming the serial', async () => {
    const lv = await create(level());
    const res = await api('/api/instruments', { cookie: cookies.admin, method: 'POST', body: level({ serial: lv.serial }) });
    expect(res.status).toBe(409);
    expect(res.json).toMatchObject({ code: 'conflict:instrument', field: 'serial' });
  });

  it('changes and retires an instrument; the merged record is checked whole', async () => {
    const lv = await create(level());
    const bad = await api(`/api/instruments/${lv.id}`, { cookie: cookies.admin, method: 'PATCH', body: { sensitivityUnit: null } });
    expect(bad.status).toBe(400);
    expect(bad.json.field).toBe('sensitivityUnit');
    const bad2 = await api(`/api/instruments/${lv.id}`, { cookie: cookies.admin, method: 'PATCH', body: { active: 'no' } });
    expect(bad2.json.field).toBe('active');
    const ok = await api(`/api/instruments/${lv.id}`, { cookie: cookies.admin, method: 'PATCH', body: { calibrationDue: addDays(today, 10), sensitivityValue: 0.0005, sensitivityUnit: 'in/10in' } });
    expect(ok.status).toBe(200);
    expect(ok.json.instrument).toMatchObject({ status: 'due-soon', sensitivityUnit: 'in/10in', sensitivityValue: 0.0005 });
    const retired = await api(`/api/instruments/${lv.id}`, { cookie: cookies.admin, method: 'PATCH', body: { active: false } });
    expect(retired.json.instrument).toMatchObject({ active: false });
    const [row] = await db.select().from(instruments).where(eq(instruments.id, lv.id));
    expect(row).toMatchObject({ active: false, calibrationDue: addDays(today, 10) });
  });

  it('hides another organisation’s instrument behind a 404 on every route', async () => {
    const lv = await create(level());
    for (const [method, body] of [['GET', undefined], ['PATCH', { model: 'taken over' }]] as const) {
      const res = await api(`/api/instruments/${lv.id}`, { cookie: cookies.outsider, method, body });
      expect(res.status, method).toBe(404);
    }
    expect((await api(`/api/instruments/${lv.id}/certificate`, { cookie: cookies.outsider })).status).toBe(404);
    expect((await upload(lv.id, pdf, 'cert.pdf', cookies.outsider)).status).toBe(404);
    const list = await api('/api/instruments?pageSize=200', { cookie: cookies.outsider });
    expect((list.json.rows as { id: string }[]).map((r) => r.id)).not.toContain(lv.id);
  });

  it('answers a malformed id with a 400 naming the id', async () => {
    const res = await api('/api/instruments/not-a-uuid', { cookie: cookies.admin });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe('id');
  });
});

describe('the instrument list', () => {
  let fresh: OrgFixture;
  let cookie: string;
  beforeAll(async () => {
    fresh = await makeOrganisation(db, 'List');
    cookie = await signInOverHttp(fresh.users.reviewer.email);
    const admin = await signInOverHttp(fresh.users.admin.email);
    await create(level({ model: 'Alpha level', serial: 'A-1', calibrationDue: addDays(today, 200) }), admin);
    await create(level({ model: 'Bravo level', serial: 'B-2', calibrationDue: today }), admin);
    await create(indicator({ model: 'Charlie indicator', serial: 'C-3', calibrationDue: addDays(today, -1) }), admin);
    const retired = await create(indicator({ model: 'Delta indicator', serial: 'D-4', calibrationDue: addDays(today, 30) }), admin);
    await api(`/api/instruments/${retired.id}`, { cookie: admin, method: 'PATCH', body: { active: false } });
  });

  const serials = async (qs: string) => {
    const res = await api(`/api/instruments?${qs}`, { cookie });
    expect(res.status, JSON.stringify(res.json)).toBe(200);
    return { serials: (res.json.rows as { serial: string }[]).map((r) => r.serial), total: res.json.total };
  };

  it('sorts by calibration due by default, active instruments only', async () => {
    expect(await serials('')).toEqual({ serials: ['C-3', 'B-2', 'A-1'], total: 3 });
    expect((await serials('sort=model&dir=desc')).serials).toEqual(['C-3', 'B-2', 'A-1']);
    expect((await serials('sort=serial&dir=asc')).serials).toEqual(['A-1', 'B-2', 'C-3']);
  });

  it('filters by text over model and serial, by kind and by status, and pages', async () => {
    expect((await serials('q=bravo')).serials).toEqual(['B-2']);
    expect((await serials('q=c-3')).serials).toEqual(['C-3']);
    expect((await serials('q=%25')).serials).toEqual([]);
    expect((await serials('kind=level')).serials).toEqual(['B-2', 'A-1']);
    expect((await serials('status=expired')).serials).toEqual(['C-3']);
    expect((await serials('status=due-soon')).serials).toEqual(['B-2']);
    expect((await serials('status=current')).serials).toEqual(['A-1']);
    expect((await serials('status=retired')).serials).toEqual(['D-4']);
    expect(await serials('sort=serial&pageSize=2&page=2')).toEqual({ serials: ['C-3'], total: 3 });
  });

  it.each([
    ['sort=price', 'sort'],
    ['dir=up', 'dir'],
    ['page=0', 'page'],
    ['pageSize=500', 'pageSize'],
    ['kind=laser', 'kind'],
    ['status=lost', 'status'],
  ])('refuses %s with a 400 naming the field', async (qs, field) => {
    const res = await api(`/api/instruments?${qs}`, { cookie });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe(field);
  });
});

describe('calibration certificates', () => {
  it('stores a PDF under a random key and serves it back only as a download', async () => {
    const lv = await create(level());
    expect((await api(`/api/instruments/${lv.id}/certificate`, { cookie: cookies.technician })).status).toBe(404);
    const res = await upload(lv.id, pdf, 'Calibration "2026" <LV>.pdf');
    expect(res.status, JSON.stringify(res.json)).toBe(200);
    expect(res.json.instrument).toMatchObject({ certificate: { name: 'Calibration 2026 LV.pdf', type: 'application/pdf', bytes: pdf.byteLength } });
    const [row] = await db.select().from(instruments).where(eq(instruments.id, lv.id));
    expect(row!.certificateKey).toMatch(/^certificates\/[0-9a-f-]{36}\.pdf$/);

    const got = await fetch(`${APP_URL}/api/instruments/${lv.id}/certificate`, { headers: { cookie: cookies.technician! } });
    expect(got.status).toBe(200);
    expect(got.headers.get('content-type')).toBe('application/pdf');
    expect(got.headers.get('content-disposition')).toBe('attachment; filename="Calibration 2026 LV.pdf"');
    expect(got.headers.get('x-content-type-options')).toBe('nosniff');
    expect(got.headers.get('cache-control')).toBe('private, no-store');
    expect(new Uint8Array(await got.arrayBuffer())).toEqual(pdf);
  });

  it('replaces the certificate, naming the file for its real content', async () => {
    const lv = await create(level());
    await upload(lv.id, pdf, 'first.pdf');
    const [first] = await db.select().from(instruments).where(eq(instruments.id, lv.id));
    const res = await upload(lv.id, png, 'scan.pdf');
    expect(res.status).toBe(200);
    expect(res.json.instrument).toMatchObject({ certificate: { name: 'scan.png', type: 'image/png' } });
    const [second] = await db.select().from(instruments).where(eq(instruments.id, lv.id));
    expect(second!.certificateKey).not.toBe(first!.certificateKey);
    const got = await fetch(`${APP_URL}/api/instruments/${lv.id}/certificate`, { headers: { cookie: cookies.reviewer! } });
    expect(got.headers.get('content-type')).toBe('image/png');
  });

  it.each([
    ['an HTML page named .pdf', new TextEncoder().encode('<!doctype html><html><body><script>alert(1)</script></body></html>'), 'certificate.pdf', /must be a PDF, PNG, JPEG or WebP/],
    ['a script named .pdf', new TextEncoder().encode('#!/bin/sh\necho hello\n'), 'certificate.pdf', /must be a PDF, PNG, JPEG or WebP/],
    ['an empty file', new Uint8Array(0), 'empty.pdf', /empty/],
    ['a PDF over 10 MB', (() => { const b = new Uint8Array(10 * 1024 * 1024 + 1); b.set(pdf); return b; })(), 'huge.pdf', /larger than 10 MB/],
  ])('refuses %s with a 400 naming the file, storing nothing', async (_what, bytes, name, detail) => {
    const lv = await create(level());
    const res = await upload(lv.id, bytes, name);
    expect(res.status).toBe(400);
    expect(res.json).toMatchObject({ code: 'bad_request:upload', field: 'file' });
    expect(String(res.json.detail)).toMatch(detail);
    const [row] = await db.select().from(instruments).where(eq(instruments.id, lv.id));
    expect(row!.certificateKey).toBeNull();
  });

  it('refuses a body without a file with a 400', async () => {
    const lv = await create(level());
    const res = await api(`/api/instruments/${lv.id}/certificate`, { cookie: cookies.admin, method: 'PUT', body: { file: 'x' } });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe('file');
    const form = new FormData();
    form.set('other', 'x');
    const res2 = await fetch(`${APP_URL}/api/instruments/${lv.id}/certificate`, { method: 'PUT', body: form, headers: { cookie: cookies.admin! } });
    expect(res2.status).toBe(400);
  });

  it('refuses an upload by a technician with 403', async () => {
    const lv = await create(level());
    const res = await upload(lv.id, pdf, 'cert.pdf', cookies.technician);
    expect(res.status).toBe(403);
    const [row] = await db.select().from(instruments).where(eq(instruments.id, lv.id));
    expect(row!.certificateKey).toBeNull();
  });
});
