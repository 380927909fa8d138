'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import Link from 'next/link';
import { useId, useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { DUE_KEY } from '@/components/due/due-table';
import { ApiError, apiFetch } from '@/components/session/api';
import { Button } from '@/components/ui/button';
import { FormField, inputClass } from '@/components/ui/form-field';
import { scheduleVisitInput } from '@/lib/fleet/visits';
import { MachinePicker, type MachineChoice } from './machine-picker';
import { VISITS_KEY } from './visits-table';

type Person = { id: string; name: string };
type In = z.input<typeof scheduleVisitInput>;
type Out = z.output<typeof scheduleVisitInput>;

/** `YYYY-MM-DDTHH:mm` in the browser's zone, as a datetime-local input wants it. */
function localInputValue(d: Date): string {
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}

/** The admin's form to schedule a visit; checked with the same schema as POST /api/visits. */
export function ScheduleVisitForm({ technicians, experts, initialMachine }: { technicians: Person[]; experts: Person[]; initialMachine: MachineChoice | null }) {
  const queryClient = useQueryClient();
  const machineLabel = useId();
  const [machine, setMachine] = useState<MachineChoice | null>(initialMachine);
  const [localTime, setLocalTime] = useState('');
  const [done, setDone] = useState<{ id: string; noticeSent: boolean; label: string } | null>(null);
  const form = useForm<In, unknown, Out>({
    resolver: zodResolver(scheduleVisitInput),
    defaultValues: { machineId: initialMachine?.id ?? '', technicianId: technicians.length === 1 ? technicians[0]!.id : '', expertId: '', scheduledFor: '', notes: '' },
  });
  const { errors } = form.formState;
  const mutation = useMutation({
    mutationFn: (body: Out) => apiFetch<{ visit: { id: string }; noticeSent: boolean }>('/api/visits', { method: 'POST', body }),
    onSuccess: async (res) => {
      setDone({ id: res.visit.id, noticeSent: res.noticeSent, label: machine ? `${machine.model} · ${machine.serial}` : 'the machine' });
      form.reset({ machineId: '', technicianId: form.getValues('technicianId'), expertId: form.getValues('expertId'), scheduledFor: '', notes: '' });
      setMachine(null);
      setLocalTime('');
      await Promise.all([queryClient.invalidateQueries({ queryKey: VISITS_KEY }), queryClient.invalidateQueries({ queryKey: DUE_KEY })]);
    },
    onError: (e) => {
      if (e instanceof ApiError && e.field && ['machineId', 'technicianId', 'expertId', 'scheduledFor', 'notes'].includes(e.field)) {
        form.setError(e.field as keyof In, { message: e.message.replace(new RegExp(`^${e.field}: `), '') });
      }
    },
  });

  const submit = form.handleSubmit((values) => {
    setDone(null);
    mutation.mutate({ ...values, expertId: values.expertId || null });
  });
  const minTime = localInputValue(new Date());

  return (
    <form onSubmit={submit} noValidate aria-labelledby="schedule-h" className="grid gap-4 rounded-xl border-2 border-rule bg-card p-4">
      <h2 id="schedule-h" className="text-xl font-bold">
        Schedule a visit
      </h2>
      <div className="grid gap-1 font-semibold">
        <span id={machineLabel}>Machine</span>
        <MachinePicker
          labelId={machineLabel}
          value={machine}
          invalid={Boolean(errors.machineId)}
          onChange={(m) => {
            setMachine(m);
            form.setValue('machineId', m?.id ?? '', { shouldValidate: form.formState.isSubmitted });
          }}
        />
        {errors.machineId && (
          <span role="alert" className="text-sm font-semibold text-fail">
            {errors.machineId.message === 'must be a machine (UUID)' ? 'Choose a machine' : errors.machineId.message}
          </span>
        )}
      </div>
      <div className="grid gap-4 sm:grid-cols-3">
        <FormField label="Technician" error={errors.technicianId ? 'Choose the technician' : undefined}>
          <select {...form.register('technicianId')} aria-invalid={Boolean(errors.technicianId)} className={inputClass}>
            <option value="">Choose…</option>
            {technicians.map((t) => (
              <option key={t.id} value={t.id}>
                {t.name}
              </option>
            ))}
          </select>
        </FormField>
        <FormField label="Expert (optional)" error={errors.expertId?.message}>
          <select {...form.register('expertId')} aria-invalid={Boolean(errors.expertId)} className={inputClass}>
            <option value="">No expert</option>
            {experts.map((t) => (
              <option key={t.id} value={t.id}>
                {t.name}
              </option>
            ))}
          </select>
        </FormField>
        <FormField label="Date and time" hint="Your local time" error={errors.scheduledFor ? (localTime ? errors.scheduledFor.message : 'Choose a date and time') : undefined}>
          <input
            type="datetime-local"
            value={localTime}
            min={minTime}
            aria-invalid={Boolean(errors.scheduledFor)}
            onChange={(e) => {
              setLocalTime(e.target.value);
              const d = e.target.value ? new Date(e.target.value) : null;
              form.setValue('scheduledFor', d && !Number.isNaN(d.getTime()) ? d.toISOString() : '', { shouldValidate: form.formState.isSubmitted });
            }}
            className={inputClass}
          />
        </FormField>
      </div>
      <FormField label="Notes (optional)" error={errors.notes?.message}>
        <textarea {...form.register('notes')} rows={2} aria-invalid={Boolean(errors.notes)} className={`${inputClass} py-2`} placeholder="What the customer reported, access, parts to bring" />
      </FormField>
      <div className="flex flex-wrap items-center gap-4">
        <Button type="submit" disabled={mutation.isPending}>
          {mutation.isPending ? 'Scheduling…' : 'Schedule visit'}
        </Button>
        {mutation.error && !(mutation.error instanceof ApiError && mutation.error.field) && (
          <p role="alert" className="font-semibold text-fail">
            {mutation.error.message}
          </p>
        )}
        {done && (
          <p role="status" className="font-semibold text-pass">
            Visit scheduled for {done.label}.{' '}
            {done.noticeSent ? 'The technician and expert were e-mailed.' : 'The notice e-mail could not be sent.'}{' '}
            <Link href={`/visits/${done.id}`} className="text-spirit underline underline-offset-4">
              Open the visit
            </Link>
          </p>
        )}
      </div>
    </form>
  );
}
