'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useForm, type FieldValues, type Path } from 'react-hook-form';
import type { z } from 'zod';
import { apiFetch, ApiError } from '@/components/session/api';
import { Button } from './button';
import { FormField, inputClass } from './form-field';

export type SchemaField<T> = { name: Path<T> & string; label: string; kind?: 'text' | 'email' | 'textarea' | 'checkbox'; hint?: string };

type Props<S extends z.ZodType<FieldValues, FieldValues>> = {
  schema: S;
  fields: SchemaField<z.input<S>>[];
  defaultValues: z.input<S>;
  /** Where to send it: the route that parses with the same schema. */
  action: { url: string; method: 'POST' | 'PATCH' };
  submitLabel: string;
  /** react-query keys to refresh after saving (the page's server data refreshes too). */
  invalidate?: readonly unknown[][];
  resetOnSuccess?: boolean;
};

/** A small form driven by a shared zod schema: react-hook-form checks on the client, the route again on the server. */
export function SchemaForm<S extends z.ZodType<FieldValues, FieldValues>>({ schema, fields, defaultValues, action, submitLabel, invalidate = [], resetOnSuccess = false }: Props<S>) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const form = useForm<z.input<S>, unknown, z.output<S>>({ resolver: zodResolver(schema as never) as never, defaultValues: defaultValues as never });
  const save = useMutation({
    mutationFn: (values: z.output<S>) => apiFetch(action.url, { method: action.method, body: values }),
    onSuccess: async () => {
      await Promise.all(invalidate.map((queryKey) => queryClient.invalidateQueries({ queryKey })));
      if (resetOnSuccess) form.reset();
      router.refresh();
    },
    onError: (e) => {
      if (e instanceof ApiError && e.field) form.setError(e.field as Path<z.input<S>>, { message: e.message.replace(/^[^:]+: /, '') });
    },
  });
  const err = (name: string) => (form.formState.errors as Record<string, { message?: string } | undefined>)[name]?.message;
  return (
    <form onSubmit={form.handleSubmit((v) => save.mutate(v))} noValidate className="grid gap-3">
      {fields.map((f) =>
        f.kind === 'checkbox' ? (
          <label key={f.name} className="flex min-h-12 items-center gap-3 font-semibold">
            <input type="checkbox" {...form.register(f.name)} className="size-6 accent-spirit" />
            {f.label}
          </label>
        ) : (
          <FormField key={f.name} label={f.label} error={err(f.name)} hint={f.hint}>
            {f.kind === 'textarea' ? (
              <textarea rows={3} {...form.register(f.name)} aria-invalid={Boolean(err(f.name))} className={`${inputClass} py-2`} />
            ) : (
              <input type={f.kind ?? 'text'} {...form.register(f.name)} aria-invalid={Boolean(err(f.name))} className={inputClass} />
            )}
          </FormField>
        ),
      )}
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={save.isPending}>
          {save.isPending ? 'Saving…' : submitLabel}
        </Button>
        {save.isSuccess && <span role="status" className="font-semibold text-pass">Saved.</span>}
        {save.error && !(save.error instanceof ApiError && save.error.field) && <span role="alert" className="font-semibold text-fail">{save.error.message}</span>}
      </div>
    </form>
  );
}
