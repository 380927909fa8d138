import { randomBytes, randomUUID } from 'node:crypto';
import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { invitations, users } from '@/db/schema';
import { hashInvitationToken } from '@/lib/fleet/invitations-service';
import { endUserSockets } from '@/lib/realtime/bus';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { api, signInOverHttp } from './helpers/http';
import { bootRealtime } from './helpers/realtime';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  org = await makeOrganisation(db, 'Users');
  other = await makeOrganisation(db, 'Elsewhere');
  for (const role of ['technician', 'expert', 'reviewer', 'admin'] as const) cookies[role] = await signInOverHttp(org.users[role].email);
  cookies.outsider = await signInOverHttp(other.users.admin.email);
});

/** A second admin in the organisation, so the first may change others without being the last. */
async function addUser(fixture: OrgFixture, role: 'admin' | 'technician', label: string) {
  const [u] = await db
    .insert(users)
    .values({ organisationId: fixture.organisationId, role, email: `${label}-${randomUUID().slice(0, 8)}@fixture.test`, name: `${label} ${role}`, passwordHash: bcrypt.hashSync('fixture-password-1', 4) })
    .returning();
  return u!;
}

const userRow = async (id: string) => (await db.select().from(users).where(eq(users.id, id)))[0]!;

describe('users', () => {
  it.each([
    ['GET', '/api/users'],
    ['PATCH', `/api/users/${randomUUID()}`],
  ])('answers %s %s with 401 when nobody is signed in', async (method, p) => {
    const res = await api(p, { method, body: method === 'PATCH' ? { active: false } : undefined });
    expect(res.status).toBe(401);
  });

  it.each(['technician', 'expert', 'reviewer'])('refuses a %s with 403', async (role) => {
    expect((await api('/api/users', { cookie: cookies[role] })).status).toBe(403);
    const res = await api(`/api/users/${org.users.technician.id}`, { cookie: cookies[role], method: 'PATCH', body: { role: 'admin' } });
    expect(res.status).toBe(403);
    expect(res.json.code).toBe('forbidden:user');
    expect((await userRow(org.users.technician.id)).role).toBe('technician');
  });

  it('lists the organisation’s users only, with name, e-mail, role and active', async () => {
    const res = await api('/api/users', { cookie: cookies.admin });
    expect(res.status).toBe(200);
    const list = res.json.users as { id: string; email: string; role: string; active: boolean; name: string }[];
    expect(list.map((u) => u.id).sort()).toEqual(Object.values(org.users).map((u) => u.id).sort());
    expect(list.find((u) => u.id === org.users.expert.id)).toMatchObject({ email: org.users.expert.email, role: 'expert', active: true, name: org.users.expert.name });
    expect(JSON.stringify(list)).not.toContain('passwordHash');
  });

  it('hides another organisation’s user behind a 404', async () => {
    const res = await api(`/api/users/${org.users.technician.id}`, { cookie: cookies.outsider, method: 'PATCH', body: { active: false } });
    expect(res.status).toBe(404);
    expect((await userRow(org.users.technician.id)).active).toBe(true);
  });

  it.each([
    ['an unknown role', { role: 'owner' }, 'role'],
    ['active as text', { active: 'no' }, 'active'],
    ['an unknown field', { name: 'x' }, undefined],
    ['nothing to change', {}, undefined],
  ])('refuses %s with a 400, changing nothing', async (_what, body, field) => {
    const res = await api(`/api/users/${org.users.expert.id}`, { cookie: cookies.admin, method: 'PATCH', body });
    expect(res.status).toBe(400);
    if (field) expect(res.json.field).toBe(field);
    expect(await userRow(org.users.expert.id)).toMatchObject({ role: 'expert', active: true });
  });

  it('refuses a malformed id with a 400 naming it', async () => {
    const res = await api('/api/users/42', { cookie: cookies.admin, method: 'PATCH', body: { active: false } });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe('id');
  });

  it('changes a role', async () => {
    const u = await addUser(org, 'technician', 'Promote');
    const res = await api(`/api/users/${u.id}`, { cookie: cookies.admin, method: 'PATCH', body: { role: 'expert' } });
    expect(res.status).toBe(200);
    expect(res.json.user).toMatchObject({ id: u.id, role: 'expert', active: true });
    expect((await userRow(u.id)).role).toBe('expert');
  });

  it('refuses the last active admin leaving, and an admin deactivating or demoting themself, with 409', async () => {
    const lone = await makeOrganisation(db, 'Lone');
    const loneCookie = await signInOverHttp(lone.users.admin.email);
    for (const body of [{ active: false }, { role: 'technician' }]) {
      const res = await api(`/api/users/${lone.users.admin.id}`, { cookie: loneCookie, method: 'PATCH', body });
      expect(res.status).toBe(409);
      expect(res.json.code).toBe('conflict:user');
      expect(String(res.json.detail)).toMatch(/last active admin/);
    }
    await addUser(lone, 'admin', 'Second');
    const self = await api(`/api/users/${lone.users.admin.id}`, { cookie: loneCookie, method: 'PATCH', body: { active: false } });
    expect(self.status).toBe(409);
    expect(String(self.json.detail)).toMatch(/cannot deactivate yourself/);
    const demote = await api(`/api/users/${lone.users.admin.id}`, { cookie: loneCookie, method: 'PATCH', body: { role: 'reviewer' } });
    expect(demote.status).toBe(409);
    expect(String(demote.json.detail)).toMatch(/own admin role/);
    expect(await userRow(lone.users.admin.id)).toMatchObject({ role: 'admin', active: true });
  });

  it('deactivates a user: their next request is refused, sign-in fails, and reactivation lets them back', async () => {
    const u = await addUser(org, 'technician', 'Leaver');
    const cookie = await signInOverHttp(u.email, 'fixture-password-1');
    expect((await api('/api/instruments', { cookie })).status).toBe(200);
    const res = await api(`/api/users/${u.id}`, { cookie: cookies.admin, method: 'PATCH', body: { active: false } });
    expect(res.status).toBe(200);
    expect(res.json.user).toMatchObject({ active: false });
    expect((await api('/api/instruments', { cookie })).status).toBe(401);
    await expect(signInOverHttp(u.email, 'fixture-password-1')).rejects.toThrow(/sign-in failed/);
    const back = await api(`/api/users/${u.id}`, { cookie: cookies.admin, method: 'PATCH', body: { active: true } });
    expect(back.json.user).toMatchObject({ active: true });
    expect((await api('/api/instruments', { cookie })).status).toBe(200);
  });
});

describe('deactivation ends live sockets', () => {
  let rt: Awaited<ReturnType<typeof bootRealtime>>;
  beforeAll(async () => {
    rt = await bootRealtime(db);
  });
  afterAll(async () => rt.close());

  it('disconnects every socket of the user, leaves others connected, and refuses a reconnection once inactive', async () => {
    const u = await addUser(org, 'technician', 'Sockets');
    const asUser = { id: u.id, email: u.email, name: u.name, role: u.role, organisationId: u.organisationId };
    const tab1 = await rt.as(asUser);
    const tab2 = await rt.as(asUser);
    const expert = await rt.as(org.users.expert);
    const ended = [tab1, tab2].map((s) => new Promise<string>((resolve) => s.once('disconnect', (reason) => resolve(reason))));

    // What the PATCH route does after committing a deactivation, here against the test's own socket server.
    await db.update(users).set({ active: false }).where(eq(users.id, u.id));
    endUserSockets(u.id);

    expect(await Promise.all(ended)).toEqual(['io server disconnect', 'io server disconnect']);
    await new Promise((r) => setTimeout(r, 100));
    expect(expert.connected).toBe(true);
    await expect(rt.as(asUser)).rejects.toThrow(/unauthorized/);
  });
});

/** Messages the loopback mail fake caught for one address (MAILBOX_DIR), waiting briefly for delivery. */
async function mailTo(address: string, ms = 5_000): Promise<{ subject: string; text: string }[]> {
  const dir = process.env.MAILBOX_DIR;
  if (!dir) throw new Error('MAILBOX_DIR is not set');
  const until = Date.now() + ms;
  for (;;) {
    const found: { subject: string; text: string; to: string[] }[] = [];
    for (const name of (await readdir(dir).catch(() => [] as string[])).filter((n) => n.endsWith('.json'))) {
      const mail = JSON.parse(await readFile(path.join(dir, name), 'utf8')) as { subject: string; text: string; to: string[] };
      if (mail.to.some((t) => t.toLowerCase() === address.toLowerCase())) found.push(mail);
    }
    if (found.length > 0 || Date.now() > until) return found;
    await new Promise((r) => setTimeout(r, 100));
  }
}

const tokenIn = (text: string) => /\/invite\/([A-Za-z0-9_-]{43})/.exec(text)?.[1];

describe('invitations', () => {
  const fresh = () => `invitee-${randomUUID().slice(0, 8)}@fixture.test`;
  const countFor = async (email: string) => (await db.select({ id: invitations.id }).from(invitations).where(sql`lower(${invitations.email}) = lower(${email})`)).length;

  it.each([
    ['GET', '/api/invitations'],
    ['POST', '/api/invitations'],
  ])('answers %s %s with 401 when nobody is signed in', async (method, p) => {
    expect((await api(p, { method, body: method === 'POST' ? { email: fresh(), role: 'technician' } : undefined })).status).toBe(401);
  });

  it.each(['technician', 'expert', 'reviewer'])('refuses a %s inviting with 403', async (role) => {
    const email = fresh();
    const res = await api('/api/invitations', { cookie: cookies[role], method: 'POST', body: { email, role: 'technician' } });
    expect(res.status).toBe(403);
    expect((await api('/api/invitations', { cookie: cookies[role] })).status).toBe(403);
    expect(await countFor(email)).toBe(0);
  });

  it.each([
    ['a malformed e-mail', { email: 'not-an-address', role: 'technician' }, 'email'],
    ['an unknown role', { email: 'x@fixture.test', role: 'owner' }, 'role'],
    ['a missing role', { email: 'y@fixture.test' }, 'role'],
  ])('refuses %s with a 400 naming the field, storing nothing', async (_what, body, field) => {
    const res = await api('/api/invitations', { cookie: cookies.admin, method: 'POST', body });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe(field);
    expect(await countFor(String(body.email))).toBe(0);
  });

  it('refuses an e-mail that already belongs to a user with 409', async () => {
    const res = await api('/api/invitations', { cookie: cookies.admin, method: 'POST', body: { email: other.users.expert.email.toUpperCase(), role: 'expert' } });
    expect(res.status).toBe(409);
    expect(res.json).toMatchObject({ code: 'conflict:invitation', field: 'email' });
  });

  it('invites by e-mail, stores only the token’s hash, and the link makes a user once', async () => {
    const email = fresh();
    const res = await api('/api/invitations', { cookie: cookies.admin, method: 'POST', body: { email, role: 'expert' } });
    expect(res.status).toBe(201);
    expect(JSON.stringify(res.json)).not.toMatch(/token/i);

    const [mail] = await mailTo(email);
    expect(mail?.subject).toBe('You are invited to Levelwire');
    const token = tokenIn(mail!.text)!;
    expect(token).toBeDefined();
    const [row] = await db.select().from(invitations).where(eq(invitations.email, email));
    expect(row!.tokenHash).toBe(hashInvitationToken(token));
    expect(row!.tokenHash).not.toContain(token);
    const days = (row!.expiresAt.getTime() - row!.createdAt.getTime()) / 86_400_000;
    expect(days).toBeCloseTo(7, 2);

    const pending = await api('/api/invitations', { cookie: cookies.admin });
    expect((pending.json.invitations as { email: string; role: string }[]).find((i) => i.email === email)).toMatchObject({ role: 'expert' });
    const elsewhere = await api('/api/invitations', { cookie: cookies.outsider });
    expect((elsewhere.json.invitations as { email: string }[]).map((i) => i.email)).not.toContain(email);

    const accepted = await api('/api/invitations/accept', { method: 'POST', body: { token, name: 'Ivy Newcomb', password: 'spirit-level-42' } });
    expect(accepted.status, JSON.stringify(accepted.json)).toBe(201);
    expect(accepted.json.user).toMatchObject({ email, role: 'expert', name: 'Ivy Newcomb' });
    const [user] = await db.select().from(users).where(eq(users.email, email));
    expect(user).toMatchObject({ organisationId: org.organisationId, role: 'expert', active: true });
    expect(user!.passwordHash).toMatch(/^\$2[aby]\$10\$/);
    await signInOverHttp(email, 'spirit-level-42');

    const again = await api('/api/invitations/accept', { method: 'POST', body: { token, name: 'Someone Else', password: 'spirit-level-43' } });
    expect(again.status).toBe(409);
    expect(String(again.json.detail)).toMatch(/already been used/);
    const afterwards = await api('/api/invitations', { cookie: cookies.admin });
    expect((afterwards.json.invitations as { email: string }[]).map((i) => i.email)).not.toContain(email);
  });

  it('refuses an unknown and an expired token with a 400 saying so, creating nobody', async () => {
    const unknown = await api('/api/invitations/accept', { method: 'POST', body: { token: randomBytes(32).toString('base64url'), name: 'Nobody Known', password: 'spirit-level-42' } });
    expect(unknown.status).toBe(400);
    expect(unknown.json).toMatchObject({ code: 'bad_request:invitation', field: 'token' });
    expect(String(unknown.json.detail)).toMatch(/not valid/);

    const token = randomBytes(32).toString('base64url');
    const email = fresh();
    await db.insert(invitations).values({ organisationId: org.organisationId, email, role: 'technician', tokenHash: hashInvitationToken(token), invitedById: org.users.admin.id, expiresAt: new Date(Date.now() - 60_000) });
    const expired = await api('/api/invitations/accept', { method: 'POST', body: { token, name: 'Late Comer', password: 'spirit-level-42' } });
    expect(expired.status).toBe(400);
    expect(String(expired.json.detail)).toMatch(/expired on/);
    expect(await db.select().from(users).where(eq(users.email, email))).toEqual([]);
  });

  it.each([
    ['a short password', { password: 'short-1' }, 'password', /at least 12/],
    ['a password without a digit', { password: 'no-digits-here-at-all' }, 'password', /digit/],
    ['a password without a letter', { password: '1234567890123' }, 'password', /letter/],
    ['a missing name', { name: '' }, 'name', /at least 2/],
    ['a malformed token', { token: 'abc' }, 'token', /invitation link/],
  ])('refuses %s with a 400 naming the field, leaving the invitation usable', async (_what, patch, field, detail) => {
    const token = randomBytes(32).toString('base64url');
    const email = fresh();
    await db.insert(invitations).values({ organisationId: org.organisationId, email, role: 'technician', tokenHash: hashInvitationToken(token), invitedById: org.users.admin.id, expiresAt: new Date(Date.now() + 86_400_000) });
    const res = await api('/api/invitations/accept', { method: 'POST', body: { token, name: 'Pat Example', password: 'spirit-level-42', ...patch } });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe(field);
    expect(String(res.json.detail)).toMatch(detail);
    expect(await db.select().from(users).where(eq(users.email, email))).toEqual([]);
    const [inv] = await db.select().from(invitations).where(eq(invitations.email, email));
    expect(inv!.acceptedAt).toBeNull();
  });
});
