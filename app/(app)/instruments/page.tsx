import type { Metadata } from 'next';
import Link from 'next/link';
import { InstrumentsTable } from '@/components/instruments/instruments-table';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { todayUtc } from '@/lib/dates';

export const metadata: Metadata = { title: 'Instruments' };
export const dynamic = 'force-dynamic';

export default async function InstrumentsPage() {
  const actor = await requirePageActor('/instruments');
  return (
    <main className="mx-auto grid max-w-6xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">Instruments</h1>
          <p className="text-ink-soft">Levels and indicators with their calibration. An expired instrument cannot be chosen for a visit without an admin’s written reason.</p>
        </div>
        {can(actor, 'instrument:write') && (
          <Link href="/instruments/new" className="inline-flex min-h-12 items-center rounded-lg bg-spirit px-5 text-lg font-semibold text-white hover:bg-spirit-deep">
            Add instrument
          </Link>
        )}
      </div>
      <InstrumentsTable unitSystem={actor.unitSystem} today={todayUtc()} />
    </main>
  );
}
