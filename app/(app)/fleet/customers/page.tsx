import type { Metadata } from 'next';
import Link from 'next/link';
import { db } from '@/db/client';
import { listCustomers } from '@/db/queries/customers';
import { NewCustomerForm } from '@/components/fleet/customer-forms';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Customers' };

export default async function CustomersPage() {
  const actor = await requirePageActor('/fleet/customers');
  const customers = await listCustomers(db(), { organisationId: actor.organisationId });
  return (
    <main className="mx-auto grid max-w-5xl grid-cols-[minmax(0,1fr)] gap-6 p-4 sm:p-6">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1 className="text-2xl font-bold">Customers</h1>
        <Link href="/fleet" className="font-semibold text-spirit underline underline-offset-4">
          Machines
        </Link>
      </div>
      <ul className="grid gap-2">
        {customers.map((c) => (
          <li key={c.id}>
            <Link href={`/fleet/customers/${c.id}`} className="flex min-h-14 items-center justify-between rounded-xl border-2 border-rule bg-card px-4 py-2 hover:border-spirit">
              <span className="font-bold">{c.name}</span>
              <span className="text-ink-soft">
                {c.siteCount} site{c.siteCount === 1 ? '' : 's'}
              </span>
            </Link>
          </li>
        ))}
        {customers.length === 0 && <li className="text-ink-soft">No customers yet.</li>}
      </ul>
      {can(actor, 'fleet:write') && (
        <section className="rounded-2xl border-2 border-rule bg-card p-4">
          <h2 className="mb-3 text-lg font-bold">Add a customer</h2>
          <NewCustomerForm />
        </section>
      )}
    </main>
  );
}
