import type { Metadata } from 'next';
import { db } from '@/db/client';
import { countDueByStatus, getReminderDaysBefore } from '@/db/queries/due';
import { DueSummary } from '@/components/due/due-summary';
import { DueTable } from '@/components/due/due-table';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { todayUtc } from '@/lib/dates';

export const metadata: Metadata = { title: 'Due list' };
export const dynamic = 'force-dynamic';

export default async function DuePage() {
  const actor = await requirePageActor('/due');
  const organisationId = actor.organisationId;
  const soonDays = await getReminderDaysBefore(db(), { organisationId });
  const today = todayUtc(new Date());
  const counts = await countDueByStatus(db(), { organisationId, today, soonDays });
  return (
    <main className="mx-auto grid max-w-6xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <div>
        <h1 className="text-2xl font-bold">Due list</h1>
        <p className="text-ink-soft">
          Each machine is due its check interval after its last leveling: the last approved session, or the leveling on record from before Levelwire. Dates are UTC days.
        </p>
      </div>
      <DueSummary overdue={counts.overdue} dueSoon={counts.dueSoon} soonDays={soonDays} href={null} title="At a glance" />
      <div id="list">
        <DueTable soonDays={soonDays} today={today} canSchedule={can(actor, 'visit:write')} />
      </div>
    </main>
  );
}
