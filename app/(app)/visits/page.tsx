import type { Metadata } from 'next';
import { db } from '@/db/client';
import { getMachineForVisit, listUsersByRole } from '@/db/queries/visits';
import { RunRemindersButton } from '@/components/visits/run-reminders-button';
import { ScheduleVisitForm } from '@/components/visits/schedule-visit-form';
import { VisitsTable } from '@/components/visits/visits-table';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Visits' };
export const dynamic = 'force-dynamic';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export default async function VisitsPage({ searchParams }: { searchParams: Promise<{ machine?: string }> }) {
  const actor = await requirePageActor('/visits');
  const { machine } = await searchParams;
  const mayWrite = can(actor, 'visit:write');
  const organisationId = actor.organisationId;
  const [technicians, experts, initialMachine] = mayWrite
    ? await Promise.all([
        listUsersByRole(db(), { organisationId, role: 'technician' }),
        listUsersByRole(db(), { organisationId, role: 'expert' }),
        machine && UUID.test(machine) ? getMachineForVisit(db(), { organisationId, id: machine }) : Promise.resolve(null),
      ])
    : [[], [], null];
  return (
    <main className="mx-auto grid max-w-6xl grid-cols-[minmax(0,1fr)] gap-6 p-4 sm:p-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">Visits</h1>
          <p className="text-ink-soft">Scheduled service calls, one machine each. Times show in your own time zone; e-mails give UTC.</p>
        </div>
        {mayWrite && <RunRemindersButton />}
      </div>
      {mayWrite && (
        <div id="schedule">
          <ScheduleVisitForm technicians={technicians} experts={experts} initialMachine={initialMachine} />
        </div>
      )}
      <section aria-labelledby="visits-h" className="grid gap-3">
        <h2 id="visits-h" className="text-xl font-bold">
          All visits
        </h2>
        <VisitsTable />
      </section>
    </main>
  );
}
