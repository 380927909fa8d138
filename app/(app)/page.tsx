import Link from 'next/link';
import { db } from '@/db/client';
import { listMachinesByOrganisation } from '@/db/queries/machines';
import { listSessionsByOrganisation } from '@/db/queries/sessions';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { OpenSessionButton } from '@/components/session/open-session-button';

export const dynamic = 'force-dynamic';

const stateLabel: Record<string, string> = {
  planned: 'Planned',
  live: 'Live',
  ended: 'Ended',
  in_review: 'In review',
  approved: 'Approved',
  returned: 'Returned',
};

export default async function HomePage() {
  const actor = await requirePageActor('/');
  const [machines, sessions] = await Promise.all([
    listMachinesByOrganisation(db(), { organisationId: actor.organisationId }),
    listSessionsByOrganisation(db(), { organisationId: actor.organisationId }),
  ]);
  const mayOpen = can(actor, 'session:open');

  return (
    <main className="mx-auto grid max-w-5xl gap-8 p-4 sm:p-6">
      <section aria-labelledby="machines-h">
        <h1 id="machines-h" className="text-2xl font-bold">
          Machines
        </h1>
        <ul className="mt-3 grid gap-3">
          {machines.map((m) => (
            <li key={m.id} className="flex flex-wrap items-center justify-between gap-3 rounded-xl border-2 border-rule bg-card p-4">
              <div>
                <p className="text-lg font-bold">{m.model}</p>
                <p className="text-ink-soft">
                  {m.site.customer.name} · {m.site.name} · serial <span className="tabular">{m.serial}</span> · {m.screws.length} leveling screws
                </p>
              </div>
              {mayOpen && <OpenSessionButton machineId={m.id} />}
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="sessions-h">
        <h2 id="sessions-h" className="text-2xl font-bold">
          Sessions
        </h2>
        {sessions.length === 0 ? (
          <p className="mt-3 text-ink-soft">No sessions yet.{mayOpen ? ' Open one from a machine above.' : ''}</p>
        ) : (
          <ul className="mt-3 grid gap-2">
            {sessions.map((s) => (
              <li key={s.id}>
                <Link
                  href={`/sessions/${s.id}`}
                  className="flex min-h-14 flex-wrap items-center justify-between gap-2 rounded-xl border-2 border-rule bg-card px-4 py-2 hover:border-spirit"
                >
                  <span>
                    <span className="font-bold">{s.machineModel}</span>
                    <span className="text-ink-soft"> · {s.customerName} · {s.technicianName}</span>
                  </span>
                  <span className="flex items-center gap-3">
                    <span className="tabular text-sm text-ink-soft">{s.createdAt.toISOString().slice(0, 16).replace('T', ' ')} UTC</span>
                    <span className={`rounded-full px-3 py-1 text-sm font-bold ${s.state === 'live' ? 'bg-vial text-ink' : 'bg-rule'}`}>
                      {stateLabel[s.state]}
                    </span>
                  </span>
                </Link>
              </li>
            ))}
          </ul>
        )}
      </section>
    </main>
  );
}
