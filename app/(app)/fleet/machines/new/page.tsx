import type { Metadata } from 'next';
import { db } from '@/db/client';
import { listSites } from '@/db/queries/customers';
import { MachineForm } from '@/components/fleet/machine-form';
import { redirect } from 'next/navigation';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'New machine' };

export default async function NewMachinePage() {
  const actor = await requirePageActor('/fleet/machines/new');
  if (!can(actor, 'fleet:write')) redirect('/fleet');
  const sites = await listSites(db(), { organisationId: actor.organisationId });
  return (
    <main className="mx-auto grid max-w-6xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <h1 className="text-2xl font-bold">New machine</h1>
      <MachineForm unitSystem={actor.unitSystem} sites={sites} />
    </main>
  );
}
