import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { db } from '@/db/client';
import { getCustomer } from '@/db/queries/customers';
import { EditContactForm, EditCustomerForm, EditSiteForm, NewContactForm, NewSiteForm } from '@/components/fleet/customer-forms';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Customer' };

export default async function CustomerPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/fleet/customers/${id}`);
  if (!z.uuid().safeParse(id).success) notFound();
  const customer = await getCustomer(db(), { organisationId: actor.organisationId, id });
  if (!customer) notFound();
  const mayWrite = can(actor, 'fleet:write');
  return (
    <main className="mx-auto grid max-w-5xl grid-cols-[minmax(0,1fr)] gap-6 p-4 sm:p-6">
      <h1 className="text-2xl font-bold">{customer.name}</h1>
      {customer.notes && <p className="max-w-3xl">{customer.notes}</p>}
      {mayWrite && (
        <details className="rounded-2xl border-2 border-rule bg-card p-4">
          <summary className="min-h-10 cursor-pointer font-semibold">Edit the customer</summary>
          <div className="mt-3"><EditCustomerForm customer={customer} /></div>
        </details>
      )}
      <section aria-labelledby="contacts-h" className="grid gap-3">
        <h2 id="contacts-h" className="text-xl font-bold">Contacts</h2>
        <ul className="grid gap-2 sm:grid-cols-2">
          {customer.contacts.map((c) => (
            <li key={c.id} className="rounded-xl border-2 border-rule bg-card p-3">
              <p className="font-bold">{c.name}</p>
              <p className="text-ink-soft">{c.position}</p>
              <p>{c.email} {c.phone && `· ${c.phone}`}</p>
              {c.receivesReports && <p className="text-sm font-semibold text-spirit">Receives the service reports</p>}
              {mayWrite && (
                <details className="mt-2">
                  <summary className="min-h-10 cursor-pointer font-semibold text-spirit">Edit</summary>
                  <div className="mt-2"><EditContactForm contact={c} /></div>
                </details>
              )}
            </li>
          ))}
          {customer.contacts.length === 0 && <li className="text-ink-soft">No contacts yet.</li>}
        </ul>
        {mayWrite && (
          <details className="rounded-2xl border-2 border-rule bg-card p-4">
            <summary className="min-h-10 cursor-pointer font-semibold">Add a contact</summary>
            <div className="mt-3"><NewContactForm customerId={customer.id} /></div>
          </details>
        )}
      </section>
      <section aria-labelledby="sites-h" className="grid gap-3">
        <h2 id="sites-h" className="text-xl font-bold">Sites</h2>
        <ul className="grid gap-2">
          {customer.sites.map((s) => (
            <li key={s.id} className="rounded-xl border-2 border-rule bg-card p-3">
              <p className="font-bold">{s.name} <span className="font-normal text-ink-soft">· {s.machineCount} machine{s.machineCount === 1 ? '' : 's'}</span></p>
              <p className="text-ink-soft">{s.address}</p>
              {s.floorNotes && <p><span className="font-semibold">Floor and foundation:</span> {s.floorNotes}</p>}
              {s.accessNotes && <p><span className="font-semibold">Access:</span> {s.accessNotes}</p>}
              {mayWrite && (
                <details className="mt-2">
                  <summary className="min-h-10 cursor-pointer font-semibold text-spirit">Edit</summary>
                  <div className="mt-2"><EditSiteForm site={s} /></div>
                </details>
              )}
            </li>
          ))}
        </ul>
        {mayWrite && (
          <details className="rounded-2xl border-2 border-rule bg-card p-4">
            <summary className="min-h-10 cursor-pointer font-semibold">Add a site</summary>
            <div className="mt-3"><NewSiteForm customerId={customer.id} /></div>
          </details>
        )}
      </section>
    </main>
  );
}
