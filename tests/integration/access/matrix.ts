// Levelwire's access matrix (issue 7, item 2): every route handler, socket event and server action, with the answer
// each kind of caller must get. tests/integration/access-matrix.test.ts finds every route file and socket event and
// fails for one without a row here, then walks every row against the running server.
//
// Columns (tests/integration/access/world.ts makes the people):
//   technician, expert, reviewer, admin   a user of that role in the first organisation; in a session row the
//                                         technician and the expert are the session's own (participants), the
//                                         reviewer and the admin read it without taking part; in a visit row the
//                                         technician is the one the visit is assigned to
//   observer                              (session rows) a technician by role, added to the session as observer
//   bystander                             (session and visit rows) a technician of the same organisation who takes no
//                                         part in the session, or is not the visit's technician
//   other                                 a user of another organisation; the admin unless `otherAs` names the
//                                         role that would be allowed, so the organisation is what refuses
//   anonymous                             no session cookie
//
// Answers: '2xx' (any success), a status (401, 403, 404, 400, 409 ...), 'own' (a 2xx whose body holds nothing of the
// first organisation: a list of the caller's own records, or a record made in the caller's own organisation), and
// 'gate' (passes authorisation: anything but 401, 403 and 404; for a row where a valid body is impractical; none
// needs it today). Socket events answer with the ack: 'ok', or the error code it carries.
import { randomUUID } from 'node:crypto';
import type { Role } from '@/db/schema';
import { footprintTemplate } from '@/lib/fleet/footprint';
import { CSV_COLUMNS } from '@/lib/fleet/machines-csv';
import type { CommandName } from '@/lib/realtime/contract';
import { MACHINE_SIZE } from '../helpers/fixtures';
import { APP_URL } from '../helpers/http';
import type { Column, World } from './world';
import { PDF_BYTES, SIGNATURE } from './world';

export type HttpExpect = '2xx' | 'own' | 'gate' | 400 | 401 | 403 | 404 | 409 | 410;
export type AckExpect = 'ok' | `${'forbidden' | 'not_found' | 'conflict' | 'bad_request'}:${string}`;

type OrgColumns<E> = Record<'technician' | 'expert' | 'reviewer' | 'admin' | 'other' | 'anonymous', E>;
type VisitColumns<E> = OrgColumns<E> & { bystander: E };
type SessionColumns<E> = VisitColumns<E> & { observer: E };

/** What one call sends: the path (the method is the row's), a body, and for a few public rows their own cookie. */
export type Call = { path: string; json?: unknown; form?: FormData; text?: string; contentType?: string; cookie?: string };
type CallFn = (ctx: { w: World; who: Column; cookie: string | undefined }) => Call | Promise<Call>;

type RouteRowBase = {
  /** Why a column answers as it does, where the code is not the obvious reading. */
  note?: string;
  /** The other organisation's user for this row (default: its admin). */
  otherAs?: Role;
  call: CallFn;
};
export type RouteRow = RouteRowBase &
  (
    | { scope: 'public' | 'organisation'; expect: OrgColumns<HttpExpect> }
    | { scope: 'visit'; expect: VisitColumns<HttpExpect> }
    | { scope: 'session'; expect: SessionColumns<HttpExpect> }
  );

export type SocketRow = {
  note?: string;
  otherAs?: Role;
  /** Anonymous callers never get as far as an event: the handshake refuses them (HANDSHAKE). */
  expect: Omit<SessionColumns<AckExpect>, 'anonymous'>;
  payload: (w: World) => unknown | Promise<unknown>;
};

const form = (fields: Record<string, string>, bytes: Uint8Array, type: string, name: string) => {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) f.set(k, v);
  f.set('file', new Blob([new Uint8Array(bytes)], { type }), name);
  return f;
};

/** The csrf token next-auth keeps in its cookie (`token|hash`), fetched first for a caller without one. */
async function csrf(cookie: string | undefined): Promise<{ token: string; cookie: string }> {
  const kept = /next-auth\.csrf-token=([^;]+)/.exec(cookie ?? '');
  if (kept) return { token: decodeURIComponent(kept[1]!).split('|')[0]!, cookie: cookie! };
  const res = await fetch(`${APP_URL}/api/auth/csrf`);
  const jar = res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  return { token: ((await res.json()) as { csrfToken: string }).csrfToken, cookie: [cookie, jar].filter(Boolean).join('; ') };
}

/** One machine-CSV row per corner screw, naming the first organisation's customer and site by name. */
function machineCsv(w: World) {
  const serial = w.fresh.serial('IMP');
  const row = (label: string, x: number, y: number) => [serial, 'Imported VMC', w.customerName, w.siteName, 1000, 500, 800, 500, 500, 9, '', label, 'corner', x, y, 'mm', 3, '', 80].join(',');
  return [CSV_COLUMNS.join(','), row('FL', -900, -700), row('FR', 900, -700), row('RL', -900, 700), row('RR', 900, 700)].join('\n');
}

const machineBody = (w: World) => ({
  siteId: w.ids.siteId,
  model: 'Access VMC',
  serial: w.fresh.serial('AX'),
  ...MACHINE_SIZE,
  checkIntervalMonths: 9,
  screws: footprintTemplate(4, 2000, 1500),
});

const inDays = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString();

/** Every `app/api/**\/route.ts` export, by "METHOD /api/path/:param". */
export const ROUTES: Record<string, RouteRow> = {
  // ── public: next-auth, health, the report link, accepting an invitation ──────────────────────────────────────────
  'GET /api/auth/:nextauth*': {
    scope: 'public',
    note: 'next-auth’s own endpoints (csrf, session, providers); the session endpoint is shown',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: '2xx', anonymous: '2xx' },
    call: () => ({ path: '/api/auth/session' }),
  },
  'POST /api/auth/:nextauth*': {
    scope: 'public',
    note: 'next-auth’s sign-in and sign-out; sign-out with the csrf token is shown (a JWT stays valid, so later rows are unaffected)',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: '2xx', anonymous: '2xx' },
    call: async ({ cookie }) => {
      const { token, cookie: withCsrf } = await csrf(cookie);
      return { path: '/api/auth/signout', text: new URLSearchParams({ csrfToken: token, json: 'true' }).toString(), contentType: 'application/x-www-form-urlencoded', cookie: withCsrf };
    },
  },
  'GET /api/health': {
    scope: 'public',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: '2xx', anonymous: '2xx' },
    call: () => ({ path: '/api/health' }),
  },
  'GET /api/reports/:token': {
    scope: 'public',
    note: 'the signed link is the permission, whoever holds it (a changed link is a 403, an expired one a 410: tests/integration/report.test.ts)',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: '2xx', anonymous: '2xx' },
    call: ({ w }) => ({ path: `/api/reports/${w.reportToken}` }),
  },
  'POST /api/invitations/accept': {
    scope: 'public',
    note: 'the invitation’s token is the permission; a fresh invitation per call',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: '2xx', anonymous: '2xx' },
    call: async ({ w }) => ({ path: '/api/invitations/accept', json: { token: await w.fresh.invitationToken(), name: 'Access Newcomer', password: 'spirit-level-42' } }),
  },

  // ── customers, sites, contacts (fleet:read everyone, fleet:write admins) ─────────────────────────────────────────
  'GET /api/customers': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/customers' }),
  },
  'POST /api/customers': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/customers', json: { name: 'Access new customer' } }),
  },
  'GET /api/customers/:id': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/customers/${w.ids.customerId}` }),
  },
  'PATCH /api/customers/:id': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/customers/${w.ids.customerId}`, json: { notes: 'Two shifts; ask for the foreman.' } }),
  },
  'POST /api/customers/:id/contacts': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/customers/${w.ids.customerId}/contacts`, json: { name: 'Access new contact' } }),
  },
  'PATCH /api/contacts/:id': {
    scope: 'organisation',
    note: 'a fresh contact per call (the report row needs the lead’s e-mail as it is)',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: async ({ w }) => ({ path: `/api/contacts/${await w.fresh.contact()}`, json: { position: 'Plant engineer' } }),
  },
  'DELETE /api/contacts/:id': {
    scope: 'organisation',
    note: 'a fresh contact per call',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: async ({ w }) => ({ path: `/api/contacts/${await w.fresh.contact()}` }),
  },
  'GET /api/sites': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/sites' }),
  },
  'POST /api/sites': {
    scope: 'organisation',
    note: 'other: the first organisation’s customer is unknown to them, a 400 naming customerId',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 400, anonymous: 401 },
    call: ({ w }) => ({ path: '/api/sites', json: { customerId: w.ids.customerId, name: 'Access hall B' } }),
  },
  'GET /api/sites/:id': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sites/${w.ids.siteId}` }),
  },
  'PATCH /api/sites/:id': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sites/${w.ids.siteId}`, json: { accessNotes: 'Gate 3, sign in at the lodge.' } }),
  },

  // ── machines ─────────────────────────────────────────────────────────────────────────────────────────────────────
  'GET /api/machines': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/machines' }),
  },
  'POST /api/machines': {
    scope: 'organisation',
    note: 'other: the first organisation’s site is unknown to them, a 400 naming siteId',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 400, anonymous: 401 },
    call: ({ w }) => ({ path: '/api/machines', json: machineBody(w) }),
  },
  'GET /api/machines/:id': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/machines/${w.ids.machineId}` }),
  },
  'PATCH /api/machines/:id': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/machines/${w.ids.machineId}`, json: { checkIntervalMonths: 12 } }),
  },
  'GET /api/machines/:id/history': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/machines/${w.ids.machineId}/history` }),
  },
  'GET /api/machines/export': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/machines/export' }),
  },
  'POST /api/machines/import': {
    scope: 'organisation',
    note: 'a CSV naming the first organisation’s customer and site; other: those names are unknown to them, a 400',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 400, anonymous: 401 },
    call: ({ w }) => ({ path: '/api/machines/import', text: machineCsv(w), contentType: 'text/csv' }),
  },
  'GET /api/due': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/due' }),
  },

  // ── instruments (instrument:read everyone, instrument:write admins) ──────────────────────────────────────────────
  'GET /api/instruments': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/instruments' }),
  },
  'POST /api/instruments': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 'own', anonymous: 401 },
    call: ({ w }) => ({
      path: '/api/instruments',
      json: { kind: 'indicator', model: 'Access lever indicator', serial: w.fresh.serial('TI'), resolutionUm: 2, rangeMm: 0.4, calibrationDue: inDays(90).slice(0, 10) },
    }),
  },
  'GET /api/instruments/:id': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/instruments/${w.ids.instrumentId}` }),
  },
  'PATCH /api/instruments/:id': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/instruments/${w.ids.instrumentId}`, json: { vialCount: 2 } }),
  },
  'GET /api/instruments/:id/certificate': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/instruments/${w.ids.instrumentId}/certificate` }),
  },
  'PUT /api/instruments/:id/certificate': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/instruments/${w.ids.instrumentId}/certificate`, form: form({}, PDF_BYTES, 'application/pdf', 'certificate.pdf') }),
  },

  // ── visits (visit:read everyone, visit:write admins; instruments also the visit's own technician) ────────────────
  'GET /api/visits': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/visits' }),
  },
  'POST /api/visits': {
    scope: 'organisation',
    note: 'other: the first organisation’s machine is unknown to them, a 404',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: '/api/visits', json: { machineId: w.ids.machineId, technicianId: w.people.technician.id, scheduledFor: inDays(10) } }),
  },
  'GET /api/visits/:id': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/visits/${w.ids.visitId}` }),
  },
  'PATCH /api/visits/:id': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/visits/${w.ids.visitId}`, json: { notes: 'Bring the long straightedge.' } }),
  },
  'POST /api/visits/:id/instruments': {
    scope: 'visit',
    note: 'an admin or the visit’s own technician; a fresh visit per call',
    expect: { technician: '2xx', bystander: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: async ({ w }) => ({ path: `/api/visits/${await w.fresh.visit()}/instruments`, json: { instrumentId: w.ids.instrumentId } }),
  },
  'DELETE /api/visits/:id/instruments/:instrumentId': {
    scope: 'visit',
    note: 'an admin or the visit’s own technician; a fresh visit with the instrument chosen per call',
    expect: { technician: '2xx', bystander: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: async ({ w }) => ({ path: `/api/visits/${await w.fresh.visitWithInstrument()}/instruments/${w.ids.instrumentId}` }),
  },
  'POST /api/reminders/run': {
    scope: 'organisation',
    note: 'visit:write; other: runs for their own organisation only',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/reminders/run' }),
  },

  // ── people ───────────────────────────────────────────────────────────────────────────────────────────────────────
  'GET /api/me': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/me' }),
  },
  'PATCH /api/me': {
    scope: 'organisation',
    note: 'each caller’s own unit preference',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/me', json: { unitSystem: 'metric' } }),
  },
  'GET /api/people': {
    scope: 'organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/people' }),
  },
  'GET /api/users': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/users' }),
  },
  'PATCH /api/users/:id': {
    scope: 'organisation',
    note: 'a fresh user per call (made an expert)',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: async ({ w }) => ({ path: `/api/users/${await w.fresh.user()}`, json: { role: 'expert' } }),
  },
  'GET /api/invitations': {
    scope: 'organisation',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/invitations' }),
  },
  'POST /api/invitations': {
    scope: 'organisation',
    note: 'a fresh address per call (the e-mail goes to the mail fake)',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 'own', anonymous: 401 },
    call: ({ w }) => ({ path: '/api/invitations', json: { email: w.fresh.email('invitee'), role: 'technician' } }),
  },

  // ── sessions: the list, opening, importing ───────────────────────────────────────────────────────────────────────
  'GET /api/sessions': {
    scope: 'organisation',
    note: 'each caller’s own sessions; reviewers and admins every one of their organisation',
    expect: { technician: '2xx', expert: '2xx', reviewer: '2xx', admin: '2xx', other: 'own', anonymous: 401 },
    call: () => ({ path: '/api/sessions' }),
  },
  'POST /api/sessions': {
    scope: 'organisation',
    note: 'session:open (technicians); other: a technician elsewhere, refused the first organisation’s machine',
    otherAs: 'technician',
    expect: { technician: '2xx', expert: 403, reviewer: 403, admin: 403, other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: '/api/sessions', json: { machineId: w.ids.machineId, experts: [w.people.expert.id] } }),
  },
  'POST /api/sessions/import': {
    scope: 'organisation',
    note: 'session:import (admins); a fresh file per call for the first organisation’s machine; other: that machine is not theirs, a 400 naming machineId',
    expect: { technician: 403, expert: 403, reviewer: 403, admin: '2xx', other: 400, anonymous: 401 },
    call: ({ w }) => ({ path: '/api/sessions/import', json: w.fresh.sessionFile() }),
  },

  // ── one session (its standing: technician, expert, observer; reviewers and admins read) ──────────────────────────
  'GET /api/sessions/:id': {
    scope: 'session',
    expect: { technician: '2xx', expert: '2xx', observer: '2xx', bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.liveSessionId}` }),
  },
  'GET /api/sessions/:id/events': {
    scope: 'session',
    expect: { technician: '2xx', expert: '2xx', observer: '2xx', bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.liveSessionId}/events` }),
  },
  'GET /api/sessions/:id/verify': {
    scope: 'session',
    expect: { technician: '2xx', expert: '2xx', observer: '2xx', bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.liveSessionId}/verify` }),
  },
  'GET /api/sessions/:id/export': {
    scope: 'session',
    expect: { technician: '2xx', expert: '2xx', observer: '2xx', bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.endedSessionId}/export` }),
  },
  'GET /api/sessions/:id/participants': {
    scope: 'session',
    expect: { technician: '2xx', expert: '2xx', observer: '2xx', bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.liveSessionId}/participants` }),
  },
  'POST /api/sessions/:id/participants': {
    scope: 'session',
    note: 'the session’s technician or an admin; a fresh session per call, the reviewer added as observer',
    expect: { technician: '2xx', expert: 403, observer: 403, bystander: 403, reviewer: 403, admin: '2xx', other: 404, anonymous: 401 },
    call: async ({ w }) => ({ path: `/api/sessions/${await w.fresh.liveSession()}/participants`, json: { userId: w.people.reviewer.id, part: 'observer' } }),
  },
  'POST /api/sessions/:id/readings': {
    scope: 'session',
    otherAs: 'technician',
    expect: { technician: '2xx', expert: 403, observer: 403, bystander: 403, reviewer: 403, admin: 403, other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.liveSessionId}/readings`, json: { id: randomUUID(), reading: { kind: 'level', stage: 'rough-level', axis: 'x', positionMm: 0, divisions: 1 } } }),
  },
  'POST /api/sessions/:id/photos': {
    scope: 'session',
    otherAs: 'technician',
    expect: { technician: '2xx', expert: 403, observer: 403, bystander: 403, reviewer: 403, admin: 403, other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.liveSessionId}/photos`, form: form({ id: randomUUID(), stage: 'height-check' }, w.png, 'image/png', 'photo.png') }),
  },
  'GET /api/sessions/:id/photos/:photoId': {
    scope: 'session',
    expect: { technician: '2xx', expert: '2xx', observer: '2xx', bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.liveSessionId}/photos/${w.ids.photoId}?size=thumb` }),
  },
  'POST /api/sessions/:id/review': {
    scope: 'session',
    note: 'session:review and the reader standing; a comment on an ended session',
    otherAs: 'reviewer',
    expect: { technician: 403, expert: 403, observer: 403, bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.endedSessionId}/review`, json: { kind: 'comment', id: randomUUID(), atSeq: 1, text: 'Why was the twist left at the limit?' } }),
  },
  'POST /api/sessions/:id/resume': {
    scope: 'session',
    note: 'the session’s technician takes a returned record up again; a fresh returned session per call',
    otherAs: 'technician',
    expect: { technician: '2xx', expert: 403, observer: 403, bystander: 403, reviewer: 403, admin: 403, other: 404, anonymous: 401 },
    call: async ({ w }) => ({ path: `/api/sessions/${await w.fresh.returnedSession()}/resume`, json: { id: randomUUID() } }),
  },
  'GET /api/sessions/:id/report': {
    scope: 'session',
    note: 'the approved session’s PDF',
    expect: { technician: '2xx', expert: '2xx', observer: '2xx', bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.approvedSessionId}/report` }),
  },
  'GET /api/sessions/:id/report/send': {
    scope: 'session',
    note: 'session:review (reviewers and admins) before the standing',
    otherAs: 'reviewer',
    expect: { technician: 403, expert: 403, observer: 403, bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.approvedSessionId}/report/send` }),
  },
  'POST /api/sessions/:id/report/send': {
    scope: 'session',
    note: 'session:review; the approved session’s report goes to the customer’s contact (the mail fake)',
    otherAs: 'reviewer',
    expect: { technician: 403, expert: 403, observer: 403, bystander: 403, reviewer: '2xx', admin: '2xx', other: 404, anonymous: 401 },
    call: ({ w }) => ({ path: `/api/sessions/${w.ids.approvedSessionId}/report/send`, json: { days: 3 } }),
  },
};

/** Every socket event of `commands` in lib/realtime/contract.ts, with the acknowledgement each caller gets. */
export const SOCKET_EVENTS: Record<CommandName, SocketRow> = {
  'session:join': {
    expect: { technician: 'ok', expert: 'ok', observer: 'ok', bystander: 'forbidden:session', reviewer: 'ok', admin: 'ok', other: 'not_found:session' },
    payload: (w) => ({ sessionId: w.ids.liveSessionId, afterSeq: 0 }),
  },
  'session:leave': {
    note: 'leaving a room stores and reveals nothing, so it checks no standing',
    expect: { technician: 'ok', expert: 'ok', observer: 'ok', bystander: 'ok', reviewer: 'ok', admin: 'ok', other: 'ok' },
    payload: (w) => ({ sessionId: w.ids.liveSessionId }),
  },
  'link:ping': {
    note: 'answers the server’s time to anyone signed in; the round trip is kept only for a session the socket joined',
    expect: { technician: 'ok', expert: 'ok', observer: 'ok', bystander: 'ok', reviewer: 'ok', admin: 'ok', other: 'ok' },
    payload: (w) => ({ sessionId: w.ids.liveSessionId, rttMs: 40 }),
  },
  'reading:submit': {
    otherAs: 'technician',
    expect: { technician: 'ok', expert: 'forbidden:reading', observer: 'forbidden:reading', bystander: 'forbidden:session', reviewer: 'forbidden:reading', admin: 'forbidden:reading', other: 'not_found:session' },
    payload: (w) => ({ id: randomUUID(), sessionId: w.ids.liveSessionId, reading: { kind: 'level', stage: 'rough-level', axis: 'y', positionMm: 0, divisions: -0.5 } }),
  },
  'stage:enter': {
    otherAs: 'technician',
    expect: { technician: 'ok', expert: 'forbidden:stage', observer: 'forbidden:stage', bystander: 'forbidden:session', reviewer: 'forbidden:stage', admin: 'forbidden:stage', other: 'not_found:session' },
    payload: (w) => ({ id: randomUUID(), sessionId: w.ids.liveSessionId, stage: 'height-check' }),
  },
  'check:mark': {
    otherAs: 'technician',
    expect: { technician: 'ok', expert: 'forbidden:check', observer: 'forbidden:check', bystander: 'forbidden:session', reviewer: 'forbidden:check', admin: 'forbidden:check', other: 'not_found:session' },
    payload: (w) => ({ id: randomUUID(), sessionId: w.ids.liveSessionId, stage: 'prepare', item: 'table-clean', done: true }),
  },
  'move:send': {
    otherAs: 'expert',
    expect: { technician: 'forbidden:move', expert: 'ok', observer: 'forbidden:move', bystander: 'forbidden:session', reviewer: 'forbidden:move', admin: 'forbidden:move', other: 'not_found:session' },
    payload: async (w) => {
      const [screwId] = await w.fresh.screwsOf(w.ids.liveSessionId);
      return { id: randomUUID(), sessionId: w.ids.liveSessionId, stage: 'rough-level', screwId, turns: 0.25 };
    },
  },
  'move:answer': {
    note: 'a fresh move from the expert per call',
    otherAs: 'technician',
    expect: { technician: 'ok', expert: 'forbidden:move', observer: 'forbidden:move', bystander: 'forbidden:session', reviewer: 'forbidden:move', admin: 'forbidden:move', other: 'not_found:session' },
    payload: async (w) => ({ id: randomUUID(), sessionId: w.ids.liveSessionId, moveId: await w.fresh.pendingMove(w.ids.liveSessionId), outcome: 'done', turns: 0.25 }),
  },
  'note:post': {
    otherAs: 'technician',
    expect: { technician: 'ok', expert: 'ok', observer: 'ok', bystander: 'forbidden:session', reviewer: 'forbidden:note', admin: 'forbidden:note', other: 'not_found:session' },
    payload: (w) => ({ id: randomUUID(), sessionId: w.ids.liveSessionId, text: 'Checked the pads.' }),
  },
  'session:end': {
    note: 'a fresh live session per call',
    otherAs: 'technician',
    expect: { technician: 'ok', expert: 'ok', observer: 'forbidden:session', bystander: 'forbidden:session', reviewer: 'forbidden:session', admin: 'forbidden:session', other: 'not_found:session' },
    payload: async (w) => ({ id: randomUUID(), sessionId: await w.fresh.liveSession(), reason: 'done for today' }),
  },
};

/** The socket handshake: a session cookie of an active user, or no connection at all. */
export const HANDSHAKE: SessionColumns<'connects' | 'refused'> = {
  technician: 'connects',
  expert: 'connects',
  observer: 'connects',
  bystander: 'connects',
  reviewer: 'connects',
  admin: 'connects',
  other: 'connects',
  anonymous: 'refused',
};

/**
 * Server actions, by "file#export". There are none today: no module under app/, components/ or lib/ says "use server".
 * One that appears fails the test until it has a row here naming the test file that walks its columns (an action is
 * called by its id through the page that holds it, which this walker does not do).
 */
export const SERVER_ACTIONS: Record<string, { expect: OrgColumns<HttpExpect>; walkedIn: string }> = {};
