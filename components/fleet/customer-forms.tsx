'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import type { z } from 'zod';
import { SchemaForm, type SchemaField } from '@/components/ui/schema-form';
import { contactInput, customerInput, siteInput } from '@/lib/fleet/customers';

/** The fields of each record, shared by its "add" and "edit" forms. */
const customerFields: SchemaField<z.input<typeof customerInput>>[] = [
  { name: 'name', label: 'Customer name' },
  { name: 'notes', label: 'Notes', kind: 'textarea' },
];

const contactFields: SchemaField<z.input<typeof contactInput>>[] = [
  { name: 'name', label: 'Name' },
  { name: 'position', label: 'Position', hint: 'e.g. maintenance lead, lockout authority' },
  { name: 'email', label: 'E-mail', kind: 'email' },
  { name: 'phone', label: 'Phone' },
  { name: 'receivesReports', label: 'Receives the service reports', kind: 'checkbox' },
];

/** A site's own fields; its customer is fixed by the page it is added from. */
const siteOwnInput = siteInput.omit({ customerId: true });
const siteFields: SchemaField<z.input<typeof siteOwnInput>>[] = [
  { name: 'name', label: 'Site name' },
  { name: 'address', label: 'Address' },
  { name: 'floorNotes', label: 'Floor and foundation', kind: 'textarea', hint: 'Slab thickness, isolation pads, anchoring, grout, known cracks' },
  { name: 'accessNotes', label: 'Access', kind: 'textarea', hint: 'Gate, escort, lockout authority, shifts' },
];

export function NewCustomerForm() {
  return (
    <SchemaForm
      schema={customerInput}
      fields={customerFields}
      defaultValues={{ name: '', notes: '' }}
      action={{ url: '/api/customers', method: 'POST' }}
      submitLabel="Add customer"
      resetOnSuccess
    />
  );
}

export function NewContactForm({ customerId }: { customerId: string }) {
  return (
    <SchemaForm
      schema={contactInput}
      fields={contactFields}
      defaultValues={{ name: '', position: '', email: '', phone: '', receivesReports: false }}
      action={{ url: `/api/customers/${customerId}/contacts`, method: 'POST' }}
      submitLabel="Add contact"
      resetOnSuccess
    />
  );
}

export function NewSiteForm({ customerId }: { customerId: string }) {
  return (
    <SchemaForm
      schema={siteInput}
      fields={siteFields}
      defaultValues={{ customerId, name: '', address: '', floorNotes: '', accessNotes: '' }}
      action={{ url: '/api/sites', method: 'POST' }}
      submitLabel="Add site"
      resetOnSuccess
    />
  );
}

export function EditCustomerForm({ customer }: { customer: { id: string; name: string; notes: string } }) {
  return (
    <SchemaForm
      schema={customerInput}
      fields={customerFields}
      defaultValues={{ name: customer.name, notes: customer.notes }}
      action={{ url: `/api/customers/${customer.id}`, method: 'PATCH' }}
      submitLabel="Save customer"
    />
  );
}

export function EditSiteForm({ site }: { site: { id: string; name: string; address: string; floorNotes: string; accessNotes: string } }) {
  return (
    <SchemaForm
      schema={siteOwnInput}
      fields={siteFields}
      defaultValues={{ name: site.name, address: site.address, floorNotes: site.floorNotes, accessNotes: site.accessNotes }}
      action={{ url: `/api/sites/${site.id}`, method: 'PATCH' }}
      submitLabel="Save site"
    />
  );
}

export function EditContactForm({ contact }: { contact: { id: string; name: string; position: string; email: string; phone: string; receivesReports: boolean } }) {
  const router = useRouter();
  const remove = useMutation({
    mutationFn: () =>
      fetch(`/api/contacts/${contact.id}`, { method: 'DELETE' }).then((r) => {
        if (!r.ok) throw new Error(`Could not remove (${r.status})`);
      }),
    onSuccess: () => router.refresh(),
  });
  return (
    <div className="grid gap-3">
      <SchemaForm
        schema={contactInput}
        fields={contactFields}
        defaultValues={{ name: contact.name, position: contact.position, email: contact.email, phone: contact.phone, receivesReports: contact.receivesReports }}
        action={{ url: `/api/contacts/${contact.id}`, method: 'PATCH' }}
        submitLabel="Save contact"
      />
      <button type="button" onClick={() => remove.mutate()} disabled={remove.isPending} className="min-h-12 justify-self-start rounded-lg px-3 font-semibold text-fail underline underline-offset-4 hover:bg-fail/10">
        Remove {contact.name}
      </button>
      {remove.error && <p role="alert" className="text-fail">{remove.error.message}</p>}
    </div>
  );
}
