import type { Metadata } from 'next';
import Link from 'next/link';
import { InstrumentForm } from '@/components/instruments/instrument-form';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'New instrument' };

export default async function NewInstrumentPage() {
  const actor = await requirePageActor('/instruments/new');
  return (
    <main className="mx-auto grid max-w-3xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <Link href="/instruments" className="min-h-12 content-center font-semibold text-spirit underline underline-offset-4">
        ← All instruments
      </Link>
      {can(actor, 'instrument:write') ? (
        <InstrumentForm unitSystem={actor.unitSystem} />
      ) : (
        <p role="alert" className="rounded-lg bg-fail/10 p-4 font-semibold text-fail">
          Only an admin adds instruments. Ask your service manager.
        </p>
      )}
    </main>
  );
}
