// Security headers over HTTP against the running server (issue 7, item 5): every page carries a Content-Security-Policy
// with a nonce of its own, which Next put on each of the page's scripts; the API's responses load and run nothing; the
// report PDF keeps only frames out; certificates download, photos show inline; HSTS in production only.
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { openSession } from '@/db/queries/sessions';
import type { Actor } from '@/lib/auth/actor';
import { endSession } from '@/lib/session/service';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { api, APP_URL, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
const cookies = {} as Record<'technician' | 'admin', string>;

const API_POLICY = "default-src 'none'; frame-ancestors 'none'; sandbox";
const nonceOf = (policy: string | null) => /'nonce-([A-Za-z0-9+/=]+)'/.exec(policy ?? '')?.[1];
/** Each directive of a policy by name. */
const directives = (policy: string | null) => new Map((policy ?? '').split(';').map((d) => d.trim().split(/\s+/)).map(([name, ...sources]) => [name!, sources]));

async function page(path: string, cookie?: string) {
  const res = await fetch(`${APP_URL}${path}`, { headers: cookie ? { cookie } : {}, redirect: 'manual' });
  return { res, html: await res.text(), policy: res.headers.get('content-security-policy') };
}

/** The page's policy names a nonce, and every script tag in its HTML carries exactly that nonce. */
function expectNoncedPage({ html, policy }: { html: string; policy: string | null }) {
  const nonce = nonceOf(policy);
  expect(nonce, `a nonce in ${policy}`).toBeTruthy();
  const scripts = html.match(/<script\b[^>]*>/g) ?? [];
  expect(scripts.length).toBeGreaterThan(0);
  for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`);
  return nonce!;
}

beforeAll(async () => {
  org = await makeOrganisation(db, 'Headers');
  cookies.technician = await signInOverHttp(org.users.technician.email);
  cookies.admin = await signInOverHttp(org.users.admin.email);
});

describe('pages', () => {
  it('the sign-in page: a policy with a fresh nonce per response, on every script the page holds', async () => {
    const first = await page('/sign-in');
    const second = await page('/sign-in');
    expect(first.res.status).toBe(200);
    expect(expectNoncedPage(first)).not.toBe(expectNoncedPage(second));
    const d = directives(first.policy);
    expect(d.get('default-src')).toEqual(["'self'"]);
    expect(d.get('script-src')).toEqual(expect.arrayContaining(["'self'", "'strict-dynamic'", `'nonce-${nonceOf(first.policy)}'`]));
    expect(d.get('script-src')).not.toContain("'unsafe-inline'");
    expect(d.get('frame-ancestors')).toEqual(["'none'"]);
    expect(d.get('object-src')).toEqual(["'none'"]);
    expect(d.get('connect-src')).toEqual(["'self'"]);
    expect(first.res.headers.get('x-content-type-options')).toBe('nosniff');
    expect(first.res.headers.get('x-frame-options')).toBe('DENY');
    // Never kept by a shared cache, so no two people see one nonce.
    expect(first.res.headers.get('cache-control')).toMatch(/no-store/);
  });

  it('signed-in pages and the not-found page render per request with their nonce', async () => {
    const { sessionId } = await newSession();
    for (const path of ['/', '/fleet', `/sessions/${sessionId}/field`]) {
      const p = await page(path, cookies.technician);
      expect(p.res.status, path).toBe(200);
      expectNoncedPage(p);
      expect(directives(p.policy).get('frame-ancestors')).toEqual(["'none'"]);
    }
    const missing = await page(`/no-such-page-${randomUUID()}`, cookies.technician);
    expect(missing.res.status).toBe(404);
    expectNoncedPage(missing);
  });

  it('a page’s redirect to sign-in carries the policy too', async () => {
    const p = await page('/fleet');
    expect(p.res.status).toBeGreaterThanOrEqual(300);
    expect(p.res.status).toBeLessThan(400);
    expect(directives(p.policy).get('frame-ancestors')).toEqual(["'none'"]);
  });

  it('HSTS in production only: the server’s policy allows eval (development) or sends HSTS, never both', async () => {
    const { res, policy } = await page('/sign-in');
    const development = directives(policy).get('script-src')!.includes("'unsafe-eval'");
    const hsts = res.headers.get('strict-transport-security');
    if (development) expect(hsts).toBeNull();
    else expect(hsts).toBe('max-age=63072000; includeSubDomains');
    // Static files too: a browser takes HSTS from whichever response comes first.
    const icon = await fetch(`${APP_URL}/icon.svg`);
    expect(icon.headers.get('strict-transport-security')).toBe(hsts);
    expect(icon.headers.get('x-content-type-options')).toBe('nosniff');
  });
});

async function newSession() {
  const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id] });
  return { sessionId: session.id };
}

describe('the API', () => {
  it('JSON, problems and sign-in calls: a policy that loads and runs nothing, no nonce', async () => {
    for (const [path, cookie] of [
      ['/api/health', undefined],
      ['/api/me', cookies.technician],
      ['/api/me', undefined],
      ['/api/auth/csrf', undefined],
      [`/api/sessions/${randomUUID()}/photos/${randomUUID()}?size=huge`, cookies.technician],
    ] as const) {
      const res = await fetch(`${APP_URL}${path}`, { headers: cookie ? { cookie } : {} });
      expect(res.headers.get('content-security-policy'), path).toBe(API_POLICY);
      expect(res.headers.get('x-content-type-options'), path).toBe('nosniff');
      await res.arrayBuffer();
    }
  });

  it('a photo shows inline, sandboxed and never sniffed', async () => {
    const { sessionId } = await newSession();
    const photoId = randomUUID();
    const png = await sharp({ create: { width: 40, height: 30, channels: 3, background: { r: 40, g: 120, b: 90 } } }).png().toBuffer();
    const form = new FormData();
    form.set('id', photoId);
    form.set('stage', 'height-check');
    form.set('file', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'photo.png');
    const posted = await fetch(`${APP_URL}/api/sessions/${sessionId}/photos`, { method: 'POST', body: form, headers: { cookie: cookies.technician } });
    expect(posted.status).toBe(201);
    const got = await fetch(`${APP_URL}/api/sessions/${sessionId}/photos/${photoId}`, { headers: { cookie: cookies.technician } });
    expect(got.status).toBe(200);
    expect(got.headers.get('content-type')).toBe('image/png');
    expect(got.headers.get('content-disposition')).toBe('inline');
    expect(got.headers.get('content-security-policy')).toBe(API_POLICY);
    expect(got.headers.get('x-content-type-options')).toBe('nosniff');
  });

  it('a certificate always downloads, under the sandboxed policy', async () => {
    const created = await api('/api/instruments', {
      cookie: cookies.admin,
      method: 'POST',
      body: { kind: 'indicator', model: 'Headers indicator', serial: `TI-${randomUUID().slice(0, 8)}`, resolutionUm: 2, rangeMm: 0.4, calibrationDue: '2099-01-01' },
    });
    expect(created.status, JSON.stringify(created.json)).toBe(201);
    const id = (created.json.instrument as { id: string }).id;
    const form = new FormData();
    // "%PDF-" opens every PDF file (ISO 32000-1 §7.5.2).
    form.set('file', new Blob([new TextEncoder().encode('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n')], { type: 'application/pdf' }), 'cert.pdf');
    expect((await fetch(`${APP_URL}/api/instruments/${id}/certificate`, { method: 'PUT', body: form, headers: { cookie: cookies.admin } })).status).toBe(200);
    const got = await fetch(`${APP_URL}/api/instruments/${id}/certificate`, { headers: { cookie: cookies.admin } });
    expect(got.status).toBe(200);
    expect(got.headers.get('content-disposition')).toBe('attachment; filename="cert.pdf"');
    expect(got.headers.get('content-security-policy')).toBe(API_POLICY);
    expect(got.headers.get('x-content-type-options')).toBe('nosniff');
  });

  it('the report PDF opens in the browser’s viewer: its policy only keeps frames out', async () => {
    const { sessionId } = await newSession();
    const technician: Actor = { ...org.users.technician, unitSystem: 'metric' };
    await endSession(db, technician, { id: randomUUID(), sessionId });
    const res = await fetch(`${APP_URL}/api/sessions/${sessionId}/report`, { headers: { cookie: cookies.technician } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    expect(res.headers.get('content-disposition')).toMatch(/^inline; /);
    expect(res.headers.get('content-security-policy')).toBe("frame-ancestors 'none'");
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    // The sending route beside it answers JSON, under the API's policy.
    const send = await fetch(`${APP_URL}/api/sessions/${sessionId}/report/send`, { headers: { cookie: cookies.technician } });
    expect(send.headers.get('content-security-policy')).toBe(API_POLICY);
    const link = await fetch(`${APP_URL}/api/reports/not-a-token`);
    expect(link.headers.get('content-security-policy')).toBe("frame-ancestors 'none'");
  });
});
