import { randomBytes, randomInt, randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { request, type IncomingHttpHeaders } from 'node:http';
import bcrypt from 'bcryptjs';
import { eq } from 'drizzle-orm';
import { encode, type JWT } from 'next-auth/jwt';
import { io as connect } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { invitations, signInLimits, users } from '@/db/schema';
import { clientAddress } from '@/lib/auth/client-address';
import { signInLimitKeys } from '@/lib/auth/sign-in-limit';
import { lockMessage, SIGN_IN_MISMATCH, signInErrorText } from '@/lib/auth/sign-in-messages';
import { passwordStamp, SESSION_MAX_AGE_SECONDS } from '@/lib/auth/token';
import { hashInvitationToken } from '@/lib/fleet/invitations-service';
import { PROTOCOL_VERSION, SOCKET_PATH } from '@/lib/realtime/contract';
import { makeOrganisation, PASSWORD, testDb, type OrgFixture } from './helpers/fixtures';
import { api, APP_URL, signInOverHttp } from './helpers/http';
import { bootRealtime, SECRET as REALTIME_SECRET } from './helpers/realtime';

// Levelwire's own limits, at their defaults (lib/env.ts): 5 failures per e-mail and address, 50 per address,
// 15 minutes. The server counts the connection's address; each test here connects from its own random loopback
// address (any 127.x.y.z reaches a server on 127.0.0.1), so the rest of the suite, signing in from 127.0.0.1,
// never meets these locks, and runs against a long-lived database do not meet each other's.
const MAX_FAILURES = 5;
const MAX_PER_ADDRESS = 50;
const LOCK_MS = 15 * 60_000;
const FIXTURE_HASH = bcrypt.hashSync(PASSWORD, 4);
/** A bound for tests of many sign-ins (each a bcrypt comparison on a shared machine), not a speed check. */
const SLOW_MS = 90_000;

const db = testDb();
let org: OrgFixture;

beforeAll(async () => {
  org = await makeOrganisation(db, 'Sign-in');
});

const freshAddress = () => `127.${randomInt(1, 255)}.${randomInt(0, 256)}.${randomInt(1, 255)}`;

type Reply = { status: number; headers: IncomingHttpHeaders; body: string };

/** One HTTP exchange from a chosen local address (fetch cannot choose its source address). */
function send(from: string, path: string, init: { method?: string; headers?: Record<string, string>; body?: string } = {}): Promise<Reply> {
  const url = new URL(path, APP_URL);
  return new Promise((resolve, reject) => {
    const req = request({ host: url.hostname, port: url.port, path: url.pathname + url.search, method: init.method ?? 'GET', headers: init.headers, localAddress: from }, (res) => {
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (c: string) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body }));
    });
    req.on('error', reject);
    req.end(init.body);
  });
}

const cookiesOf = (reply: Reply) => new Map((reply.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]!.split('=') as [string, string]));

/** A browser at one address: its CSRF cookie and token, then credential POSTs as next-auth's client sends them. */
async function browserAt(from: string) {
  const csrf = await send(from, '/api/auth/csrf');
  const { csrfToken } = JSON.parse(csrf.body) as { csrfToken: string };
  const csrfCookie = [...cookiesOf(csrf)].map(([k, v]) => `${k}=${v}`).join('; ');
  return {
    /** `error` is next-auth's `?error=` (CredentialsSignin, or the lock's message); `cookie` the session's when signed in. */
    async signIn(email: string, password: string, { withCsrf = true } = {}) {
      const res = await send(from, '/api/auth/callback/credentials', {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded', ...(withCsrf ? { cookie: csrfCookie } : {}) },
        body: new URLSearchParams({ ...(withCsrf ? { csrfToken } : {}), email, password, json: 'true' }).toString(),
      });
      const url = new URL((JSON.parse(res.body) as { url: string }).url);
      const session = cookiesOf(res).get('next-auth.session-token');
      return { status: res.status, url, error: url.searchParams.get('error'), cookie: session ? `next-auth.session-token=${session}` : null };
    },
  };
}

const limitRow = async (key: string) => (await db.select().from(signInLimits).where(eq(signInLimits.key, key)))[0];
const accountLock = /^Too many failed sign-ins for this e-mail from your network\. Try again in 15 minutes\.$/;
const addressLock = /^Too many failed sign-ins from your network\. Try again in 15 minutes\.$/;

describe('sign-in limits', () => {
  it(`locks an e-mail for one address after ${MAX_FAILURES} failures, the right password too, and not for another account or address`, async () => {
    const from = freshAddress();
    const browser = await browserAt(from);
    const { email } = org.users.technician;
    for (let i = 1; i < MAX_FAILURES; i += 1) expect((await browser.signIn(email, `wrong-password-${i}`)).error).toBe('CredentialsSignin');
    const fifth = await browser.signIn(email, 'wrong-password-5');
    expect(fifth.error).toMatch(accountLock);
    expect(fifth.cookie).toBeNull();

    const keys = signInLimitKeys(email, from);
    expect(keys.account).not.toContain(email); // the e-mail is stored hashed
    const locked = await limitRow(keys.account);
    expect(locked?.points).toBe(MAX_FAILURES + 1);
    expect(Number(locked?.expire) - Date.now()).toBeGreaterThan(LOCK_MS - 60_000);
    expect(Number(locked?.expire) - Date.now()).toBeLessThanOrEqual(LOCK_MS);
    expect((await limitRow(keys.address))?.points).toBe(MAX_FAILURES);

    const right = await browser.signIn(email, PASSWORD);
    expect(right.error).toMatch(accountLock);
    expect(right.cookie).toBeNull();
    // Refused before the password was looked at: nothing more was counted.
    expect(await limitRow(keys.account)).toEqual(locked);
    expect((await limitRow(keys.address))?.points).toBe(MAX_FAILURES);

    const colleague = await browser.signIn(org.users.expert.email, PASSWORD);
    expect(colleague.error).toBeNull();
    expect(colleague.cookie).not.toBeNull();
    // The owner elsewhere is not locked out by someone guessing from this address.
    await signInOverHttp(email);
  }, SLOW_MS);

  it('a success clears the count for that e-mail and address, not the address’s own', async () => {
    const from = freshAddress();
    const browser = await browserAt(from);
    const { email } = org.users.reviewer;
    const keys = signInLimitKeys(email, from);
    for (let i = 1; i < MAX_FAILURES; i += 1) await browser.signIn(email, `wrong-password-${i}`);
    expect((await limitRow(keys.account))?.points).toBe(MAX_FAILURES - 1);

    expect((await browser.signIn(email, PASSWORD)).cookie).not.toBeNull();
    expect(await limitRow(keys.account)).toBeUndefined();
    expect((await limitRow(keys.address))?.points).toBe(MAX_FAILURES - 1);

    // Counting starts again from nothing: four more failures do not lock.
    for (let i = 1; i < MAX_FAILURES; i += 1) expect((await browser.signIn(email, `wrong-again-${i}`)).error).toBe('CredentialsSignin');
    expect((await browser.signIn(email, PASSWORD)).cookie).not.toBeNull();
  }, SLOW_MS);

  it(`locks an address after ${MAX_PER_ADDRESS} failures over many e-mails, unknown ones included`, async () => {
    const from = freshAddress();
    const browser = await browserAt(from);
    // Known accounts with the fixtures' cheap hashes keep the loop light; each takes fewer failures than its own lock.
    const perAccount = MAX_FAILURES - 1;
    const crowd = await db
      .insert(users)
      .values(Array.from({ length: Math.ceil(MAX_PER_ADDRESS / perAccount) }, (_, i) => ({ organisationId: org.organisationId, role: 'technician' as const, email: `crowd-${i}-${randomUUID().slice(0, 8)}@fixture.test`, name: `Sign-in crowd ${i}`, passwordHash: FIXTURE_HASH })))
      .returning();
    const attempts = [`nobody-${randomUUID().slice(0, 8)}@fixture.test`, `nobody-${randomUUID().slice(0, 8)}@fixture.test`, ...crowd.flatMap((u) => Array<string>(perAccount).fill(u.email))].slice(0, MAX_PER_ADDRESS);
    for (const [i, email] of attempts.entries()) {
      const { error } = await browser.signIn(email, 'wrong-password');
      if (i < MAX_PER_ADDRESS - 1) expect(error).toBe('CredentialsSignin');
      else expect(error).toMatch(addressLock);
    }
    expect((await limitRow(signInLimitKeys('', from).address))?.points).toBe(MAX_PER_ADDRESS + 1);

    const right = await browser.signIn(org.users.admin.email, PASSWORD);
    expect(right.error).toMatch(addressLock);
    expect(right.cookie).toBeNull();
    await signInOverHttp(org.users.admin.email);
  }, 180_000);

  it('believes no X-Forwarded-For from the client (no trusted proxy by default)', async () => {
    const from = freshAddress();
    const spoofed = freshAddress();
    const csrf = await send(from, '/api/auth/csrf', { headers: { 'x-forwarded-for': spoofed } });
    const { csrfToken } = JSON.parse(csrf.body) as { csrfToken: string };
    const email = `nobody-${randomUUID().slice(0, 8)}@fixture.test`;
    await send(from, '/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', 'x-forwarded-for': spoofed, cookie: [...cookiesOf(csrf)].map(([k, v]) => `${k}=${v}`).join('; ') },
      body: new URLSearchParams({ csrfToken, email, password: 'wrong-password', json: 'true' }).toString(),
    });
    expect((await limitRow(signInLimitKeys(email, from).account))?.points).toBe(1);
    expect(await limitRow(signInLimitKeys(email, spoofed).account)).toBeUndefined();
  });
});

describe('clientAddress', () => {
  // RFC 7239 §5.2 and common proxy practice: each proxy appends the address it received the request from, so
  // with N trusted proxies the client is the Nth entry from the right; entries further left are the client's own.
  it.each([
    ['203.0.113.9', 0, '203.0.113.9', 'the one address server.ts pinned'],
    ['198.51.100.7, 203.0.113.9', 1, '203.0.113.9', 'one proxy: its entry, not what the client wrote'],
    ['198.51.100.7, 203.0.113.9, 192.0.2.1', 2, '203.0.113.9', 'two proxies'],
    ['203.0.113.9', 3, '203.0.113.9', 'fewer entries than proxies: the leftmost'],
    ['::ffff:203.0.113.9', 0, '203.0.113.9', 'IPv4 mapped into IPv6'],
    ['2001:db8:85a3:12:8a2e:370:7334:1', 0, '2001:0db8:85a3:0012::/64', 'IPv6 by its /64'],
    ['2001:db8::1', 0, '2001:0db8:0000:0000::/64', 'IPv6 with :: filled in'],
    ['', 0, 'unknown', 'no header at all'],
  ])('%s with %i trusted proxies is %s (%s)', (header, proxies, expected) => {
    expect(clientAddress(header ? { 'x-forwarded-for': header } : {}, proxies)).toBe(expected);
  });
});

describe('signInErrorText', () => {
  it('shows a lock’s own message, the one wording for a mismatch, and no words a link brings along', () => {
    expect(lockMessage({ scope: 'account', retryAfterMs: 61_000 })).toBe('Too many failed sign-ins for this e-mail from your network. Try again in 2 minutes.');
    expect(lockMessage({ scope: 'address', retryAfterMs: 1 })).toBe('Too many failed sign-ins from your network. Try again in 1 minute.');
    for (const lock of [lockMessage({ scope: 'account', retryAfterMs: 900_000 }), lockMessage({ scope: 'address', retryAfterMs: 60_000 })]) expect(signInErrorText(lock)).toBe(lock);
    expect(signInErrorText('CredentialsSignin')).toBe(SIGN_IN_MISMATCH);
    expect(signInErrorText('Too many failed sign-ins from your network. Call 555-0100 to unlock.')).toBe('Sign-in did not go through; try again.');
    expect(signInErrorText(undefined)).toBeNull();
  });
});

describe('CSRF', () => {
  it('refuses a credentials POST without the CSRF token and cookie, or with a token that is not the cookie’s, counting nothing', async () => {
    const from = freshAddress();
    const browser = await browserAt(from);
    const { email } = org.users.expert;
    const bare = await browser.signIn(email, PASSWORD, { withCsrf: false });
    expect(bare.cookie).toBeNull();
    expect(bare.url.pathname).toBe('/api/auth/signin');
    expect(bare.url.searchParams.get('csrf')).toBe('true');

    const other = await browserAt(from);
    const csrf = await send(from, '/api/auth/csrf');
    const res = await send(from, '/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: [...cookiesOf(csrf)].map(([k, v]) => `${k}=${v}`).join('; ') },
      body: new URLSearchParams({ csrfToken: 'f'.repeat(64), email, password: PASSWORD, json: 'true' }).toString(),
    });
    expect(cookiesOf(res).get('next-auth.session-token')).toBeUndefined();
    expect(new URL((JSON.parse(res.body) as { url: string }).url).searchParams.get('csrf')).toBe('true');

    expect(await limitRow(signInLimitKeys(email, from).address)).toBeUndefined();
    expect((await other.signIn(email, PASSWORD)).cookie).not.toBeNull();
  }, SLOW_MS);
});

/** The server's secret: the test script passes it (npm test), or the development server's .data/nextauth-secret. */
async function serverSecret(): Promise<string> {
  if (process.env.NEXTAUTH_SECRET) return process.env.NEXTAUTH_SECRET;
  return (await readFile('.data/nextauth-secret', 'utf8')).trim();
}

describe('session tokens', () => {
  let secret: string;
  let claims: JWT;
  const nowS = () => Math.floor(Date.now() / 1000);
  const cookieOf = async (token: JWT, opts: { secret?: string; maxAge?: number } = {}) =>
    `next-auth.session-token=${await encode({ token, secret: opts.secret ?? secret, maxAge: opts.maxAge ?? SESSION_MAX_AGE_SECONDS })}`;
  const status = async (cookie: string) => (await api('/api/instruments', { cookie })).status;

  beforeAll(async () => {
    secret = await serverSecret();
    const u = org.users.technician;
    const [row] = await db.select().from(users).where(eq(users.id, u.id));
    claims = { sub: u.id, name: u.name, email: u.email, role: u.role, organisationId: u.organisationId, pwd: passwordStamp(row!.passwordHash), signedInAt: nowS() };
  });

  it('lasts 12 hours from sign-in and carries the password stamp', async () => {
    const reply = await (await browserAt(freshAddress())).signIn(org.users.technician.email, PASSWORD);
    const { decode } = await import('next-auth/jwt');
    const token = await decode({ token: reply.cookie!.split('=')[1]!, secret });
    expect(Number(token?.exp) - Number(token?.iat)).toBe(12 * 60 * 60);
    expect(token).toMatchObject({ sub: org.users.technician.id, pwd: claims.pwd });
    expect(Math.abs(Number(token?.signedInAt) - nowS())).toBeLessThan(120);
  });

  it('accepts a well-made token and refuses a forged, an expired and a working-day-old one', async () => {
    expect(await status(await cookieOf(claims))).toBe(200);
    expect(await status(await cookieOf(claims, { secret: 'not-the-servers-secret-0123456789' }))).toBe(401);
    expect(await status(await cookieOf(claims, { maxAge: -60 }))).toBe(401);
    // Renewed by next-auth (a fresh expiry) but signed in 12 h and a minute ago.
    expect(await status(await cookieOf({ ...claims, signedInAt: nowS() - SESSION_MAX_AGE_SECONDS - 60 }))).toBe(401);
    expect(await status(await cookieOf({ ...claims, sub: randomUUID() }))).toBe(401);
  });

  it('refuses an old token once the password changed, on routes and pages; the new password signs in', async () => {
    const [u] = await db
      .insert(users)
      .values({ organisationId: org.organisationId, role: 'technician', email: `changer-${randomUUID().slice(0, 8)}@fixture.test`, name: 'Sign-in Changer', passwordHash: bcrypt.hashSync(PASSWORD, 4) })
      .returning();
    const cookie = await signInOverHttp(u!.email);
    expect(await status(cookie)).toBe(200);
    expect((await fetch(`${APP_URL}/`, { headers: { cookie }, redirect: 'manual' })).status).toBe(200);

    await db.update(users).set({ passwordHash: bcrypt.hashSync('changed-password-9', 4) }).where(eq(users.id, u!.id));
    expect(await status(cookie)).toBe(401);
    const page = await fetch(`${APP_URL}/`, { headers: { cookie }, redirect: 'manual' });
    expect(page.status).toBe(307);
    expect(page.headers.get('location')).toMatch(/\/sign-in\?callbackUrl=/);
    expect(await status(await signInOverHttp(u!.email, 'changed-password-9'))).toBe(200);
  }, SLOW_MS);

  it('refuses a deactivated user’s token on routes and pages', async () => {
    const [u] = await db
      .insert(users)
      .values({ organisationId: org.organisationId, role: 'expert', email: `leaver-${randomUUID().slice(0, 8)}@fixture.test`, name: 'Sign-in Leaver', passwordHash: bcrypt.hashSync(PASSWORD, 4) })
      .returning();
    const cookie = await signInOverHttp(u!.email);
    expect(await status(cookie)).toBe(200);
    const admin = await signInOverHttp(org.users.admin.email);
    expect((await api(`/api/users/${u!.id}`, { cookie: admin, method: 'PATCH', body: { active: false } })).status).toBe(200);
    expect(await status(cookie)).toBe(401);
    const page = await fetch(`${APP_URL}/instruments`, { headers: { cookie }, redirect: 'manual' });
    expect(page.status).toBe(307);
    expect(page.headers.get('location')).toMatch(/\/sign-in\?callbackUrl=/);
  }, SLOW_MS);
});

describe('socket handshake', () => {
  let rt: Awaited<ReturnType<typeof bootRealtime>>;
  beforeAll(async () => {
    rt = await bootRealtime(db);
  });
  afterAll(async () => rt.close());

  /** Connects with a session cookie made with the test server's secret; resolves 'connected' or the refusal. */
  async function handshake(token: JWT): Promise<string> {
    const cookie = `next-auth.session-token=${await encode({ token, secret: REALTIME_SECRET })}`;
    const socket = connect(rt.url, { path: SOCKET_PATH, auth: { protocol: PROTOCOL_VERSION }, extraHeaders: { cookie }, transports: ['websocket'], reconnection: false, forceNew: true });
    return new Promise((resolve) => {
      socket.once('connect', () => {
        socket.disconnect();
        resolve('connected');
      });
      socket.once('connect_error', (err) => resolve(err.message));
    });
  }

  it('refuses a token whose password stamp is stale, one a working day old, and a deactivated user’s', async () => {
    const [u] = await db
      .insert(users)
      .values({ organisationId: org.organisationId, role: 'technician', email: `socket-${randomUUID().slice(0, 8)}@fixture.test`, name: 'Sign-in Socket', passwordHash: bcrypt.hashSync(PASSWORD, 4) })
      .returning();
    const token: JWT = { sub: u!.id, name: u!.name, email: u!.email, role: u!.role, organisationId: u!.organisationId, pwd: passwordStamp(u!.passwordHash), signedInAt: Math.floor(Date.now() / 1000) };
    expect(await handshake(token)).toBe('connected');
    expect(await handshake({ ...token, signedInAt: token.signedInAt! - SESSION_MAX_AGE_SECONDS - 60 })).toMatch(/unauthorized/);

    await db.update(users).set({ passwordHash: bcrypt.hashSync('changed-password-9', 4) }).where(eq(users.id, u!.id));
    expect(await handshake(token)).toMatch(/unauthorized/);
    const [changed] = await db.select().from(users).where(eq(users.id, u!.id));
    const renewed = { ...token, pwd: passwordStamp(changed!.passwordHash) };
    expect(await handshake(renewed)).toBe('connected');

    await db.update(users).set({ active: false }).where(eq(users.id, u!.id));
    expect(await handshake(renewed)).toMatch(/unauthorized/);
  });
});

describe('password rules on accepting an invitation', () => {
  async function invite() {
    const token = randomBytes(32).toString('base64url');
    const email = `rules-${randomUUID().slice(0, 8)}@fixture.test`;
    await db.insert(invitations).values({ organisationId: org.organisationId, email, role: 'technician', tokenHash: hashInvitationToken(token), invitedById: org.users.admin.id, expiresAt: new Date(Date.now() + 86_400_000) });
    return { token, email };
  }

  it.each([
    ['the invited e-mail with a digit', (email: string) => `${email}1`, /e-mail address or name/],
    ['the name with a year', () => 'Rita Rules 2026', /e-mail address or name/],
    ['a well-known one', () => 'Password-2026!', /well-known/],
    ['one over 72 bytes', () => `${'é'.repeat(40)}1`, /81 bytes/],
  ])('refuses %s with a 400 naming password, leaving the invitation usable', async (_what, password, detail) => {
    const { token, email } = await invite();
    const res = await api('/api/invitations/accept', { method: 'POST', body: { token, name: 'Rita Rules', password: password(email) } });
    expect(res.status).toBe(400);
    expect(res.json).toMatchObject({ code: 'bad_request:invitation', field: 'password' });
    expect(String(res.json.detail)).toMatch(detail);
    expect(await db.select().from(users).where(eq(users.email, email))).toEqual([]);
  });

  it('accepts the demo password, which then signs in', async () => {
    const { token, email } = await invite();
    const res = await api('/api/invitations/accept', { method: 'POST', body: { token, name: 'Rita Rules', password: 'level-demo-2026' } });
    expect(res.status, JSON.stringify(res.json)).toBe(201);
    await signInOverHttp(email, 'level-demo-2026');
  });
});
