'use client';

import { SchemaForm } from '@/components/ui/schema-form';
import { contactInput, customerInput, siteInput } from '@/lib/fleet/customers';

export function NewCustomerForm() {
  return (
    <SchemaForm
      schema={customerInput}
      fields={[
        { name: 'name', label: 'Customer name' },
        { name: 'notes', label: 'Notes', kind: 'textarea' },
      ]}
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
      fields={[
        { name: 'name', label: 'Name' },
        { name: 'position', label: 'Position', hint: 'e.g. maintenance lead, lockout authority' },
        { name: 'email', label: 'E-mail', kind: 'email' },
        { name: 'phone', label: 'Phone' },
        { name: 'receivesReports', label: 'Receives the service reports', kind: 'checkbox' },
      ]}
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
      fields={[
        { name: 'name', label: 'Site name' },
        { name: 'address', label: 'Address' },
        { name: 'floorNotes', label: 'Floor and foundation', kind: 'textarea', hint: 'Slab thickness, isolation pads, anchoring, grout, known cracks' },
        { name: 'accessNotes', label: 'Access', kind: 'textarea', hint: 'Gate, escort, lockout authority, shifts' },
      ]}
      defaultValues={{ customerId, name: '', address: '', floorNotes: '', accessNotes: '' }}
      action={{ url: '/api/sites', method: 'POST' }}
      submitLabel="Add site"
      resetOnSuccess
    />
  );
}
