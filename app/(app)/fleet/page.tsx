import type { Metadata } from 'next';
import Link from 'next/link';
import { MachinesTable } from '@/components/fleet/machines-table';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Fleet' };

export default async function FleetPage() {
  const actor = await requirePageActor('/fleet');
  return (
    <main className="mx-auto grid max-w-6xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1 className="text-2xl font-bold">Fleet: machines</h1>
        <Link href="/fleet/customers" className="font-semibold text-spirit underline underline-offset-4">
          Customers and sites
        </Link>
      </div>
      <MachinesTable mayWrite={can(actor, 'fleet:write')} />
    </main>
  );
}
