import Link from 'next/link';
import { db } from '@/db/client';
import { listSessionsAwaitingReview, listSessionsForUser } from '@/db/queries/sessions';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { MachinePicker } from '@/components/session/machine-picker';
import { DueSummary } from '@/components/due/due-summary';
import { countDueByStatus, getReminderDaysBefore } from '@/db/queries/due';
import { todayUtc } from '@/lib/dates';
import { LocalTime } from '@/components/ui/local-time';

export const dynamic = 'force-dynamic';

/** The caller's standing in a session, as the list says it. */
const standingLabel: Record<string, string> = {
  technician: 'You measure',
  expert: 'You coach',
  observer: 'You watch',
  reader: 'You read',
};

const stateLabel: Record<string, string> = {
  planned: 'Planned',
  live: 'Live',
  ended: 'Ended',
  in_review: 'In review',
  approved: 'Approved',
  returned: 'Returned',
};

/** Sessions with a finished record to play back (a live one is followed in its field or coach view). */
const REPLAYABLE = new Set(['ended', 'in_review', 'returned', 'approved']);

export default async function HomePage() {
  const actor = await requirePageActor('/');
  const organisationId = actor.organisationId;
  const soonDays = await getReminderDaysBefore(db(), { organisationId });
  const reviews = can(actor, 'session:review');
  const [sessions, due, awaiting] = await Promise.all([
    listSessionsForUser(db(), { organisationId, userId: actor.id, readsAll: actor.role === 'reviewer' || actor.role === 'admin' }),
    countDueByStatus(db(), { organisationId, today: todayUtc(new Date()), soonDays }),
    reviews ? listSessionsAwaitingReview(db(), { organisationId }) : Promise.resolve([]),
  ]);
  const mayOpen = can(actor, 'session:open');
  // A live demo first: a newcomer coaches the virtual technician before anything else.
  sessions.sort((a, b) => Number(b.demo && b.state === 'live') - Number(a.demo && a.state === 'live'));

  return (
    <main className="mx-auto grid max-w-5xl grid-cols-[minmax(0,1fr)] gap-8 p-4 sm:p-6">
      <DueSummary overdue={due.overdue} dueSoon={due.dueSoon} soonDays={soonDays} />
      {reviews && (
        <section aria-labelledby="review-h" data-testid="awaiting-review">
          <h2 id="review-h" className="text-2xl font-bold">
            Waiting for review
          </h2>
          {awaiting.length === 0 ? (
            <p className="mt-2 text-ink-soft">No session waits for review.</p>
          ) : (
            <ul className="mt-3 grid gap-2">
              {awaiting.map((s) => (
                <li key={s.id}>
                  <Link
                    href={`/sessions/${s.id}/replay`}
                    className="flex min-h-14 flex-wrap items-center justify-between gap-2 rounded-xl border-2 border-bubble bg-card px-4 py-2 hover:border-spirit"
                  >
                    <span>
                      <span className="font-bold">{s.machineModel}</span> <span className="text-ink-soft">· {s.machineSerial}</span>
                      <span className="block text-ink-soft">
                        {s.customerName} · {s.siteName} · technician: {s.technicianName} · {s.lastSeq} events
                      </span>
                    </span>
                    <span className="flex flex-wrap items-center gap-3">
                      <span className="text-sm text-ink-soft">
                        <LocalTime iso={s.createdAt.toISOString()} />
                      </span>
                      <span className={`rounded-full px-3 py-1 text-sm font-bold ${s.state === 'in_review' ? 'bg-bubble' : 'bg-steel text-paper'}`}>{stateLabel[s.state]}</span>
                      <span className="font-semibold text-spirit underline underline-offset-4">Replay and review</span>
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
          )}
        </section>
      )}
      <section aria-labelledby="sessions-h">
        <h1 id="sessions-h" className="text-2xl font-bold">
          {actor.role === 'reviewer' || actor.role === 'admin' ? 'Sessions of your organisation' : 'Your sessions'}
        </h1>
        {sessions.length === 0 ? (
          <p className="mt-3 text-ink-soft">
            No sessions for you yet.{mayOpen ? ' Start one on a machine below.' : ' A technician adds you when they open one.'}
          </p>
        ) : (
          <ul className="mt-3 grid gap-2">
            {sessions.map((s) => {
              const returnedToMe = s.state === 'returned' && s.standing === 'technician';
              return (
                <li key={s.id} className={`flex flex-wrap items-stretch gap-2 rounded-xl border-2 bg-card ${returnedToMe ? 'border-fail' : 'border-rule'}`} data-testid="session-row" data-state={s.state}>
                  <Link
                    href={`/sessions/${s.id}`}
                    className="flex min-h-14 flex-1 flex-wrap items-center justify-between gap-2 rounded-xl px-4 py-2 hover:bg-paper"
                  >
                    <span>
                      <span className="font-bold">{s.machineModel}</span>
                      {s.demo && <span className="ml-2 rounded-full border-2 border-spirit px-2 text-sm font-bold text-spirit">Demo</span>}
                      <span className="block text-ink-soft">
                        {s.customerName} · {s.siteName} · technician: {s.technicianName}
                      </span>
                      {s.demo && s.state === 'live' && (
                        <span className="block text-sm">A simulated machine: the virtual technician takes the readings and turns the screws you send.</span>
                      )}
                      {returnedToMe && (
                        <span className="mt-1 block font-bold text-fail" data-testid="returned-marker">
                          ⚠ Returned for rework: open it to see the reviewer’s reasons and take it up again.
                        </span>
                      )}
                    </span>
                    <span className="flex flex-wrap items-center gap-3">
                      <span className="text-sm font-semibold">{standingLabel[s.standing]}</span>
                      <span className="text-sm text-ink-soft">
                        <LocalTime iso={s.createdAt.toISOString()} />
                      </span>
                      <span
                        className={`rounded-full px-3 py-1 text-sm font-bold ${s.state === 'live' ? 'bg-vial text-ink' : s.state === 'returned' ? 'bg-fail text-white' : s.state === 'approved' ? 'bg-pass text-white' : 'bg-rule'}`}
                      >
                        {stateLabel[s.state]}
                      </span>
                    </span>
                  </Link>
                  {REPLAYABLE.has(s.state) && (
                    <Link
                      href={`/sessions/${s.id}/replay`}
                      aria-label={`Replay ${s.machineModel}, ${s.createdAt.toISOString().slice(0, 16).replace('T', ' ')} UTC`}
                      className="flex min-h-14 items-center border-l-2 border-rule px-4 font-semibold text-spirit hover:bg-paper"
                    >
                      Replay
                    </Link>
                  )}
                </li>
              );
            })}
          </ul>
        )}
      </section>

      <section aria-labelledby="machines-h">
        <h2 id="machines-h" className="text-2xl font-bold">
          {mayOpen ? 'Start leveling a machine' : 'Machines'}
        </h2>
        <div className="mt-3">
          <MachinePicker mayOpen={mayOpen} />
        </div>
      </section>
    </main>
  );
}
