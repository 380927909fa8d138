// Every route handler under app/api that reads a body, a query or a path parameter, with a valid payload to start
// from and the schema the route parses it with (the judge of whether a mutated payload is still valid).
import { randomUUID } from 'node:crypto';
import { z } from 'zod';
import * as zm from 'zod/mini';
import { contactPatch, customerPatch, nameQuery, sitePatch } from '@/app/api/customers/schema';
import { dueListQuery } from '@/app/api/due/schema';
import { instrumentListQuery } from '@/app/api/instruments/schema';
import { machineListQuery } from '@/app/api/machines/schema';
import { peopleQuery } from '@/app/api/people/schema';
import { exportQuery } from '@/app/api/sessions/[id]/export/schema';
import { reportQuery } from '@/app/api/sessions/[id]/report/schema';
import { sendReportInput } from '@/app/api/sessions/[id]/report/send/schema';
import { eventsQuery, photoQuery } from '@/app/api/sessions/[id]/schema';
import { importQuery } from '@/app/api/sessions/import/schema';
import { userPatch } from '@/app/api/users/schema';
import type { Role } from '@/db/schema';
import { contactInput, customerInput, siteInput } from '@/lib/fleet/customers';
import { footprintTemplate } from '@/lib/fleet/footprint';
import { instrumentInput, instrumentPatch } from '@/lib/fleet/instruments';
import { acceptInvitationInput, invitationInput } from '@/lib/fleet/invitations';
import { machineInput, machinePatch } from '@/lib/fleet/machines';
import { scheduleVisitInput, updateVisitInput, visitInstrumentInput, visitListQuery } from '@/lib/fleet/visits';
import { addParticipantInput, openSessionInput, readingSubmit, reviewApprove, reviewComment, reviewReturn, sessionResume } from '@/lib/session/commands';
import { unitPreference } from '@/lib/settings';
import type { World } from './world';

/** Any zod schema, classic or mini: the routes use both. */
export type Schema = z.core.$ZodType;
export const accepts = (schema: Schema, value: unknown) => zm.safeParse(schema, value).success;

export type BodyTarget = {
  /** `METHOD /api/route/:id`, as the test is named. */
  name: string;
  /** Who sends it: someone the route lets through, so a payload wrongly accepted would really be stored. */
  as: Role | null;
  schema: Schema;
  /** The path and the valid payloads to start from (several where the body is a union), in the world's terms. */
  make: (w: World) => { path: string; valid: unknown[] };
};

const later = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString();

const machineOf = (w: World) => ({
  siteId: w.site.id,
  model: 'Bad input HMC',
  serial: `BI-NEW-${randomUUID().slice(0, 8)}`,
  tableLengthMm: 1200,
  tableWidthMm: 600,
  travelXMm: 1000,
  travelYMm: 600,
  travelZMm: 600,
  checkIntervalMonths: 12,
  priorLeveledOn: '2026-01-15',
  twistTolUrad: 20,
  bowTolUrad: 20,
  sweepTolUm: 10,
  screws: footprintTemplate(4, 1800, 1500),
});
const instrument = { kind: 'level', model: 'Bad input level', serial: `BI-L-${randomUUID().slice(0, 8)}`, sensitivityValue: 0.02, sensitivityUnit: 'mm/m', vialCount: 1, calibratedOn: '2026-01-01', calibrationDue: '2027-01-01' };
const command = { id: randomUUID(), clientTs: '2026-12-01T10:00:00.000Z' };
const contact = { name: 'Maintenance lead', email: 'lead@fixture.test', phone: '+1 555 0100', position: 'Lead', receivesReports: true };
const site = { name: 'Hall 2', address: '1 Works Road', floorNotes: 'Slab 300 mm', accessNotes: 'Gate B' };

export const BODY_TARGETS: BodyTarget[] = [
  { name: 'POST /api/customers', as: 'admin', schema: customerInput, make: () => ({ path: '/api/customers', valid: [{ name: 'Bad input customer', notes: 'Press shop' }] }) },
  { name: 'PATCH /api/customers/:id', as: 'admin', schema: customerPatch, make: (w) => ({ path: `/api/customers/${w.customer.id}`, valid: [{ name: 'Renamed', notes: 'Press shop' }] }) },
  { name: 'POST /api/customers/:id/contacts', as: 'admin', schema: contactInput, make: (w) => ({ path: `/api/customers/${w.customer.id}/contacts`, valid: [contact] }) },
  { name: 'PATCH /api/contacts/:id', as: 'admin', schema: contactPatch, make: (w) => ({ path: `/api/contacts/${w.contactId}`, valid: [contact] }) },
  { name: 'POST /api/sites', as: 'admin', schema: siteInput, make: (w) => ({ path: '/api/sites', valid: [{ customerId: w.customer.id, ...site }] }) },
  { name: 'PATCH /api/sites/:id', as: 'admin', schema: sitePatch, make: (w) => ({ path: `/api/sites/${w.site.id}`, valid: [site] }) },
  { name: 'POST /api/machines', as: 'admin', schema: machineInput, make: (w) => ({ path: '/api/machines', valid: [machineOf(w)] }) },
  { name: 'PATCH /api/machines/:id', as: 'admin', schema: machinePatch, make: (w) => ({ path: `/api/machines/${w.machineId}`, valid: [{ ...machineOf(w), serial: w.machineSerial }] }) },
  { name: 'POST /api/instruments', as: 'admin', schema: instrumentInput, make: () => ({ path: '/api/instruments', valid: [instrument] }) },
  { name: 'PATCH /api/instruments/:id', as: 'admin', schema: instrumentPatch, make: (w) => ({ path: `/api/instruments/${w.instrumentId}`, valid: [{ ...instrument, active: true }] }) },
  { name: 'POST /api/invitations', as: 'admin', schema: invitationInput, make: () => ({ path: '/api/invitations', valid: [{ email: 'newcomer@fixture.test', role: 'technician' }] }) },
  {
    name: 'POST /api/invitations/accept',
    as: null,
    schema: acceptInvitationInput,
    make: () => ({ path: '/api/invitations/accept', valid: [{ token: 'A'.repeat(43), name: 'New Person', password: 'a-long-password-1' }] }),
  },
  { name: 'PATCH /api/me', as: 'technician', schema: unitPreference, make: () => ({ path: '/api/me', valid: [{ unitSystem: 'inch' }] }) },
  { name: 'PATCH /api/users/:id', as: 'admin', schema: userPatch, make: (w) => ({ path: `/api/users/${w.colleagueId}`, valid: [{ role: 'expert', active: true }] }) },
  {
    name: 'POST /api/visits',
    as: 'admin',
    schema: scheduleVisitInput,
    make: (w) => ({
      path: '/api/visits',
      valid: [{ machineId: w.machineId, technicianId: w.org.users.technician.id, expertId: w.org.users.expert.id, scheduledFor: later(10), notes: 'Bring the 0.02 level' }],
    }),
  },
  { name: 'PATCH /api/visits/:id', as: 'admin', schema: updateVisitInput, make: (w) => ({ path: `/api/visits/${w.visitId}`, valid: [{ scheduledFor: later(12), notes: 'Moved', state: 'in_progress' }] }) },
  {
    name: 'POST /api/visits/:id/instruments',
    as: 'admin',
    schema: visitInstrumentInput,
    make: (w) => ({ path: `/api/visits/${w.visitId}/instruments`, valid: [{ instrumentId: w.instrumentId, overrideReason: 'Checked against the reference' }] }),
  },
  {
    name: 'POST /api/sessions',
    as: 'technician',
    schema: openSessionInput,
    make: (w) => ({ path: '/api/sessions', valid: [{ machineId: w.machineId, visitId: w.visitId, levelDivisionUrad: 20, experts: [w.org.users.expert.id], observers: [w.org.users.reviewer.id] }] }),
  },
  {
    name: 'POST /api/sessions/:id/participants',
    as: 'technician',
    schema: addParticipantInput,
    make: (w) => ({ path: `/api/sessions/${w.liveSessionId}/participants`, valid: [{ userId: w.org.users.reviewer.id, part: 'observer' }] }),
  },
  {
    name: 'POST /api/sessions/:id/readings',
    as: 'technician',
    schema: zm.omit(readingSubmit, { sessionId: true }),
    make: (w) => ({
      path: `/api/sessions/${w.liveSessionId}/readings`,
      valid: [
        { ...command, reading: { kind: 'level', stage: 'zero-level', axis: 'x', positionMm: 120, divisions: 1.5 } },
        { ...command, reading: { kind: 'reversal', stage: 'zero-level', axis: 'y', firstDiv: 1, secondDiv: -0.5 } },
        { ...command, reading: { kind: 'height', stage: 'height-check', screwId: w.screwIds[0], heightMm: 42 } },
        { ...command, reading: { kind: 'sweep', stage: 'spindle-sweep', diameterMm: 254, frontUm: 3, backUm: -2, leftUm: 1, rightUm: 0 } },
      ],
    }),
  },
  {
    name: 'POST /api/sessions/:id/review',
    as: 'reviewer',
    // The route's own union of the three review commands, each without its session id.
    schema: zm.discriminatedUnion('kind', [
      zm.extend(zm.omit(reviewComment, { sessionId: true }), { kind: zm.literal('comment') }),
      zm.extend(zm.omit(reviewReturn, { sessionId: true }), { kind: zm.literal('return') }),
      zm.extend(zm.omit(reviewApprove, { sessionId: true }), { kind: zm.literal('approve') }),
    ]),
    make: (w) => ({
      path: `/api/sessions/${w.endedSessionId}/review`,
      valid: [
        { kind: 'comment', ...command, atSeq: 2, text: 'Check the rear left screw' },
        { kind: 'return', ...command, reasons: ['Twist not rechecked', 'No sweep'] },
        { kind: 'approve', ...command, name: 'Rev Iewer', signature: { width: 400, height: 120, strokes: [[10, 10, 40, 50, 80, 60]] } },
      ],
    }),
  },
  {
    name: 'POST /api/sessions/:id/resume',
    as: 'technician',
    schema: zm.omit(sessionResume, { sessionId: true }),
    make: (w) => ({ path: `/api/sessions/${w.endedSessionId}/resume`, valid: [{ ...command, note: 'Rework the twist' }] }),
  },
  { name: 'POST /api/sessions/:id/report/send', as: 'reviewer', schema: sendReportInput, make: (w) => ({ path: `/api/sessions/${w.endedSessionId}/report/send`, valid: [{ days: 7 }] }) },
];

export type PathTarget = {
  method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  /** The route with its dynamic segments as `[name]`. */
  route: string;
  as: Role;
  /** A valid body for the routes that read one (the path is parsed first, so it alone is at fault); forms are the test's. */
  body?: (w: World) => { json: unknown } | { form: 'photo' | 'certificate' };
  /** Whether the route names the segment as a field (`[token]` is a signed link, not an id: a 403). */
  names: boolean;
};

/** Static segments beside a dynamic one: a "malformed id" equal to one of them is another route. */
export const RESERVED_SEGMENTS = ['import', 'export'];

const json = (value: unknown) => () => ({ json: value });

export const PATH_TARGETS: PathTarget[] = [
  { method: 'PATCH', route: '/api/contacts/[id]', as: 'admin', body: json({ name: 'Lead' }), names: true },
  { method: 'DELETE', route: '/api/contacts/[id]', as: 'admin', names: true },
  { method: 'POST', route: '/api/customers/[id]/contacts', as: 'admin', body: json({ name: 'Lead' }), names: true },
  { method: 'GET', route: '/api/customers/[id]', as: 'admin', names: true },
  { method: 'PATCH', route: '/api/customers/[id]', as: 'admin', body: json({ name: 'Renamed' }), names: true },
  { method: 'GET', route: '/api/instruments/[id]/certificate', as: 'admin', names: true },
  { method: 'PUT', route: '/api/instruments/[id]/certificate', as: 'admin', body: () => ({ form: 'certificate' }), names: true },
  { method: 'GET', route: '/api/instruments/[id]', as: 'admin', names: true },
  { method: 'PATCH', route: '/api/instruments/[id]', as: 'admin', body: json({ model: 'Renamed' }), names: true },
  { method: 'GET', route: '/api/machines/[id]/history', as: 'admin', names: true },
  { method: 'GET', route: '/api/machines/[id]', as: 'admin', names: true },
  { method: 'PATCH', route: '/api/machines/[id]', as: 'admin', body: json({ model: 'Renamed' }), names: true },
  { method: 'GET', route: '/api/reports/[token]', as: 'admin', names: false },
  { method: 'GET', route: '/api/sessions/[id]/events', as: 'technician', names: true },
  { method: 'GET', route: '/api/sessions/[id]/export', as: 'technician', names: true },
  { method: 'GET', route: '/api/sessions/[id]/participants', as: 'technician', names: true },
  { method: 'POST', route: '/api/sessions/[id]/participants', as: 'technician', body: (w) => ({ json: { userId: w.org.users.reviewer.id, part: 'observer' } }), names: true },
  { method: 'GET', route: '/api/sessions/[id]/photos/[photoId]', as: 'technician', names: true },
  { method: 'POST', route: '/api/sessions/[id]/photos', as: 'technician', body: () => ({ form: 'photo' }), names: true },
  { method: 'POST', route: '/api/sessions/[id]/readings', as: 'technician', body: json({ id: randomUUID(), reading: { kind: 'level', axis: 'x', positionMm: 0, divisions: 1 } }), names: true },
  { method: 'GET', route: '/api/sessions/[id]/report', as: 'technician', names: true },
  { method: 'GET', route: '/api/sessions/[id]/report/send', as: 'reviewer', names: true },
  { method: 'POST', route: '/api/sessions/[id]/report/send', as: 'reviewer', body: json({}), names: true },
  { method: 'POST', route: '/api/sessions/[id]/resume', as: 'technician', body: json({ id: randomUUID() }), names: true },
  { method: 'POST', route: '/api/sessions/[id]/review', as: 'reviewer', body: json({ kind: 'comment', id: randomUUID(), atSeq: 1, text: 'Fine' }), names: true },
  { method: 'GET', route: '/api/sessions/[id]', as: 'technician', names: true },
  { method: 'GET', route: '/api/sessions/[id]/verify', as: 'technician', names: true },
  { method: 'GET', route: '/api/sites/[id]', as: 'admin', names: true },
  { method: 'PATCH', route: '/api/sites/[id]', as: 'admin', body: json({ name: 'Renamed' }), names: true },
  { method: 'PATCH', route: '/api/users/[id]', as: 'admin', body: json({ role: 'expert' }), names: true },
  { method: 'DELETE', route: '/api/visits/[id]/instruments/[instrumentId]', as: 'admin', names: true },
  { method: 'POST', route: '/api/visits/[id]/instruments', as: 'admin', body: (w) => ({ json: { instrumentId: w.instrumentId } }), names: true },
  { method: 'GET', route: '/api/visits/[id]', as: 'admin', names: true },
  { method: 'PATCH', route: '/api/visits/[id]', as: 'admin', body: json({ notes: 'Moved' }), names: true },
];

/** The valid value of each dynamic segment of `route`: the world's row of the route's own kind. */
export function segmentsFor(route: string, w: World): Record<string, string> {
  const kind = route.split('/')[2]!;
  const own: Record<string, string> = {
    contacts: w.contactId,
    customers: w.customer.id,
    instruments: w.instrumentId,
    machines: w.machineId,
    sites: w.site.id,
    users: w.colleagueId,
    visits: w.visitId,
    sessions: w.liveSessionId,
  };
  return { id: own[kind] ?? w.liveSessionId, photoId: randomUUID(), instrumentId: w.instrumentId, token: 'x' };
}

export type QueryTarget = { route: string; method: 'GET' | 'POST'; as: Role; schema: Schema; valid: Record<string, string> };

const list = { q: 'VMC', dir: 'desc', page: '1', pageSize: '25' };

export const QUERY_TARGETS: QueryTarget[] = [
  { route: '/api/customers', method: 'GET', as: 'admin', schema: nameQuery, valid: { q: 'Bad' } },
  { route: '/api/sites', method: 'GET', as: 'admin', schema: nameQuery, valid: { q: 'Bad' } },
  { route: '/api/due', method: 'GET', as: 'admin', schema: dueListQuery, valid: { ...list, sort: 'nextDue', status: 'all', soonDays: '30' } },
  { route: '/api/instruments', method: 'GET', as: 'admin', schema: instrumentListQuery, valid: { ...list, sort: 'serial', kind: 'level', status: 'current' } },
  { route: '/api/machines', method: 'GET', as: 'admin', schema: machineListQuery, valid: { ...list, sort: 'serial' } },
  { route: '/api/visits', method: 'GET', as: 'admin', schema: visitListQuery, valid: { ...list, sort: 'scheduledFor', state: 'open', from: '2026-01-01', to: '2099-12-31' } },
  { route: '/api/people', method: 'GET', as: 'technician', schema: peopleQuery, valid: { role: 'expert' } },
  { route: '/api/sessions/[id]/events', method: 'GET', as: 'technician', schema: eventsQuery, valid: { after: '1' } },
  { route: '/api/sessions/[id]/export', method: 'GET', as: 'technician', schema: exportQuery, valid: { format: 'csv' } },
  { route: '/api/sessions/[id]/report', method: 'GET', as: 'technician', schema: reportQuery, valid: { units: 'metric' } },
  { route: '/api/sessions/[id]/photos/[photoId]', method: 'GET', as: 'technician', schema: photoQuery, valid: { size: 'thumb' } },
  { route: '/api/sessions/import', method: 'POST', as: 'admin', schema: importQuery, valid: { machineId: '00000000-0000-4000-8000-000000000000' } },
];

/** A route with its dynamic segments filled from `segments`, each encoded for the URL. */
export function pathOf(route: string, segments: Record<string, string>): string {
  return route.replace(/\[(\w+)\]/g, (_m, name: string) => encodeURIComponent(segments[name]!));
}
