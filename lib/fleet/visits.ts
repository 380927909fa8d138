import { z } from 'zod';
import { AppError } from '@/lib/errors';
import { listQuery } from '@/lib/list-query';

export const VISIT_STATES = ['scheduled', 'in_progress', 'completed', 'cancelled'] as const;
export type VisitState = (typeof VISIT_STATES)[number];

/** One visit in the list, as GET /api/visits answers it. */
export type VisitRow = {
  id: string;
  scheduledFor: string;
  state: VisitState;
  notes: string;
  machineId: string;
  machineModel: string;
  machineSerial: string;
  customerName: string;
  siteName: string;
  technicianName: string;
  expertName: string | null;
};

export const VISIT_STATE_LABEL: Record<VisitState, string> = {
  scheduled: 'Scheduled',
  in_progress: 'In progress',
  completed: 'Completed',
  cancelled: 'Cancelled',
};

/** Which states a visit may move to from each state; completed and cancelled are final. */
export const VISIT_TRANSITIONS: Record<VisitState, readonly VisitState[]> = {
  scheduled: ['in_progress', 'cancelled'],
  in_progress: ['completed', 'cancelled'],
  completed: [],
  cancelled: [],
};

export function canMoveVisit(from: VisitState, to: VisitState): boolean {
  return VISIT_TRANSITIONS[from].includes(to);
}

/** Throws 409 naming both states when a visit may not go from `from` to `to`. */
export function assertVisitTransition(from: VisitState, to: VisitState): void {
  if (!canMoveVisit(from, to)) {
    throw new AppError('conflict:visit', `A ${VISIT_STATE_LABEL[from].toLowerCase()} visit cannot become ${VISIT_STATE_LABEL[to].toLowerCase()} (${from} → ${to})`, 'state');
  }
}

/** A visit may be scheduled this far in the past at most (the clock of a tablet drifts; a form takes time to fill). */
const GRACE_MS = 5 * 60_000;

const when = z.iso
  .datetime({ offset: true, error: 'must be a date and time (ISO 8601, e.g. 2026-05-04T08:30:00Z)' })
  .refine((v) => new Date(v).getTime() >= Date.now() - GRACE_MS, 'must not be in the past');
const notes = z.string().trim().max(2000, 'must be at most 2000 characters');
const uuid = (what: string) => z.uuid({ error: `must be ${what}` });

/** Scheduling a visit: the form and POST /api/visits share it. */
export const scheduleVisitInput = z.strictObject({
  machineId: uuid('a machine (UUID)'),
  technicianId: uuid('a technician (UUID)'),
  expertId: uuid('an expert (UUID)').nullish(),
  scheduledFor: when,
  notes: notes.optional().default(''),
});
export type ScheduleVisitInput = z.input<typeof scheduleVisitInput>;

/** Changing a visit: reschedule, notes, or move its state. */
export const updateVisitInput = z
  .strictObject({
    scheduledFor: when.optional(),
    notes: notes.optional(),
    state: z.enum(VISIT_STATES, { error: `must be one of ${VISIT_STATES.join(', ')}` }).optional(),
  })
  .refine((v) => v.scheduledFor !== undefined || v.notes !== undefined || v.state !== undefined, 'give scheduledFor, notes or state');
export type UpdateVisitInput = z.input<typeof updateVisitInput>;

export const VISIT_SORTS = ['scheduledFor', 'state', 'machine'] as const;
export type VisitSort = (typeof VISIT_SORTS)[number];

// PostgreSQL has no year 0000: such a day would fail in the query, not here.
const day = z.iso.date({ error: 'must be a date (YYYY-MM-DD)' }).refine((d) => !d.startsWith('0000'), 'must be a date (YYYY-MM-DD) from year 1');

/** GET /api/visits: the list query plus a state filter and a date range (UTC days, both ends included). */
export const visitListQuery = listQuery(VISIT_SORTS, 'scheduledFor')
  .extend({
    state: z.enum([...VISIT_STATES, 'open', 'all'], { error: `must be one of ${[...VISIT_STATES, 'open', 'all'].join(', ')}` }).default('all'),
    from: day.optional(),
    to: day.optional(),
  })
  .refine((v) => !v.from || !v.to || v.from <= v.to, { message: 'must not be before from', path: ['to'] });

/** Choosing an instrument for a visit; an instrument past its calibration due date needs an admin's written reason. */
export const visitInstrumentInput = z.strictObject({
  instrumentId: uuid('an instrument (UUID)'),
  overrideReason: z.string().trim().max(500, 'must be at most 500 characters').optional(),
});

const WEEKDAYS = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];
const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

/** A time in words, in UTC: "Tuesday 8 December 2026, 14:30 UTC". Levelwire keeps no time zone per site yet. */
export function timeInWords(at: Date): string {
  const hh = String(at.getUTCHours()).padStart(2, '0');
  const mm = String(at.getUTCMinutes()).padStart(2, '0');
  return `${WEEKDAYS[at.getUTCDay()]} ${at.getUTCDate()} ${MONTHS[at.getUTCMonth()]} ${at.getUTCFullYear()}, ${hh}:${mm} UTC`;
}

export type VisitForMail = {
  scheduledFor: Date;
  notes: string;
  machine: { model: string; serial: string };
  site: { name: string; address: string; accessNotes?: string };
  customerName: string;
  technicianName: string;
  expertName: string | null;
};

/** The plain-text notice the technician and the expert receive when a visit is scheduled or moved. */
export function visitNotice(v: VisitForMail, kind: 'scheduled' | 'rescheduled' | 'reminder'): { subject: string; text: string } {
  const words = timeInWords(v.scheduledFor);
  const subject =
    kind === 'reminder'
      ? `Reminder: leveling visit ${words} — ${v.machine.model} ${v.machine.serial}`
      : `Leveling visit ${kind}: ${v.machine.model} ${v.machine.serial}, ${words}`;
  const lines = [
    kind === 'reminder' ? 'A leveling visit starts within the next 24 hours.' : kind === 'rescheduled' ? 'A leveling visit has been moved.' : 'A leveling visit has been scheduled.',
    '',
    `Machine:    ${v.machine.model}, serial ${v.machine.serial}`,
    `Customer:   ${v.customerName}`,
    `Site:       ${v.site.name}`,
    `Address:    ${v.site.address || '(no address on record)'}`,
    `When:       ${words}`,
    `            ${v.scheduledFor.toISOString()}`,
    `Technician: ${v.technicianName}`,
    `Expert:     ${v.expertName ?? '(none assigned)'}`,
  ];
  if (v.site.accessNotes) lines.push(`Access:     ${v.site.accessNotes}`);
  if (v.notes) lines.push('', 'Notes:', v.notes);
  lines.push('', 'Times are in UTC. Levelwire');
  return { subject, text: lines.join('\n') };
}
