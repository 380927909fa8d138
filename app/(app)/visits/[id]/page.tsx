import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { db } from '@/db/client';
import { getVisit, listActiveInstruments, listVisitInstruments, listVisitSessions } from '@/db/queries/visits';
import { StartVisitSession } from '@/components/visits/start-visit-session';
import { convertSlope, type SlopeUnit } from '@/lib/leveling/units';
import { LocalTime } from '@/components/ui/local-time';
import { VisitActions } from '@/components/visits/visit-actions';
import { VisitInstruments } from '@/components/visits/visit-instruments';
import { VisitStateChip } from '@/components/visits/visit-state-chip';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { calibrationStatus } from '@/lib/fleet/calibration';
import { todayUtc } from '@/lib/dates';
import { timeInWords } from '@/lib/fleet/visits';

export const metadata: Metadata = { title: 'Visit' };
export const dynamic = 'force-dynamic';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export default async function VisitPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/visits/${id}`);
  if (!UUID.test(id)) notFound();
  const detail = await getVisit(db(), { organisationId: actor.organisationId, id });
  if (!detail) notFound();
  const { visit, machine, site, customerName, technician, expert } = detail;
  const today = todayUtc();
  const isAdmin = can(actor, 'visit:write');
  const open = visit.state === 'scheduled' || visit.state === 'in_progress';
  const mayChangeInstruments = open && (isAdmin || actor.id === visit.technicianId);
  const [chosen, available, sessions] = await Promise.all([
    listVisitInstruments(db(), { visitId: id }),
    mayChangeInstruments ? listActiveInstruments(db(), { organisationId: actor.organisationId }) : Promise.resolve([]),
    listVisitSessions(db(), { visitId: id }),
  ]);
  const level = chosen.find((c) => c.kind === 'level' && c.sensitivityValue !== null && c.sensitivityUnit);
  const levelDivisionUrad = level ? Math.round(convertSlope(level.sensitivityValue!, level.sensitivityUnit as SlopeUnit, 'urad') * 1000) / 1000 : 20;
  const mayStart = open && actor.id === visit.technicianId;
  const visitDay = todayUtc(visit.scheduledFor);
  const onDay = visitDay > today ? visitDay : today;

  return (
    <main className="mx-auto grid max-w-5xl grid-cols-[minmax(0,1fr)] gap-6 p-4 sm:p-6">
      <Link href="/visits" className="inline-flex min-h-12 w-fit items-center font-semibold text-spirit underline underline-offset-4">
        ← All visits
      </Link>
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">
            Visit: {machine.model} <span className="tabular font-normal">· {machine.serial}</span>
          </h1>
          <p className="text-lg">
            <LocalTime iso={visit.scheduledFor.toISOString()} />
            <span className="block text-base text-ink-soft">In e-mails: {timeInWords(visit.scheduledFor)}</span>
          </p>
        </div>
        <VisitStateChip state={visit.state} />
      </div>
      <dl className="grid gap-x-6 gap-y-3 rounded-xl border-2 border-rule bg-card p-4 sm:grid-cols-2">
        <div>
          <dt className="font-semibold text-ink-soft">Customer · site</dt>
          <dd>
            {customerName} · {site.name}
          </dd>
        </div>
        <div>
          <dt className="font-semibold text-ink-soft">Address</dt>
          <dd>{site.address || 'No address on record'}</dd>
        </div>
        <div>
          <dt className="font-semibold text-ink-soft">Technician</dt>
          <dd>{technician.name}</dd>
        </div>
        <div>
          <dt className="font-semibold text-ink-soft">Expert</dt>
          <dd>{expert?.name ?? 'None assigned'}</dd>
        </div>
        {site.accessNotes && (
          <div className="sm:col-span-2">
            <dt className="font-semibold text-ink-soft">Site access</dt>
            <dd>{site.accessNotes}</dd>
          </div>
        )}
        <div className="sm:col-span-2">
          <dt className="font-semibold text-ink-soft">Notes</dt>
          <dd className="whitespace-pre-wrap">{visit.notes || '—'}</dd>
        </div>
        <div className="sm:col-span-2">
          <dt className="font-semibold text-ink-soft">Reminder</dt>
          <dd>{visit.reminderSentAt ? <>Sent <LocalTime iso={visit.reminderSentAt.toISOString()} /></> : 'Goes out 24 hours before the visit'}</dd>
        </div>
      </dl>
      <VisitInstruments
        visitId={id}
        today={onDay}
        isAdmin={isAdmin}
        mayChange={mayChangeInstruments}
        chosen={chosen.map((c) => ({ ...c, status: calibrationStatus(c.calibrationDue, onDay), overrideAt: c.overrideAt?.toISOString() ?? null }))}
        available={available.map((a) => ({ ...a, status: calibrationStatus(a.calibrationDue, onDay) }))}
      />
      <section aria-labelledby="sessions-h" className="grid gap-3 rounded-xl border-2 border-rule bg-card p-4">
        <h2 id="sessions-h" className="text-xl font-bold">
          Leveling sessions
        </h2>
        {sessions.length > 0 ? (
          <ul className="grid gap-2">
            {sessions.map((s) => (
              <li key={s.id}>
                <Link href={`/sessions/${s.id}`} className="inline-flex min-h-12 items-center font-semibold text-spirit underline underline-offset-4">
                  Session opened <LocalTime iso={s.createdAt.toISOString()} /> · {s.state.replace('_', ' ')} · {s.lastSeq} events
                </Link>
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-ink-soft">No session yet.</p>
        )}
        {mayStart && (
          <StartVisitSession visitId={id} machineId={machine.id} expertId={visit.expertId} levelDivisionUrad={levelDivisionUrad} levelLabel={level ? `${level.model} · ${level.serial}` : null} />
        )}
      </section>
      {isAdmin && <VisitActions visitId={id} state={visit.state} scheduledFor={visit.scheduledFor.toISOString()} notes={visit.notes} />}
    </main>
  );
}
