'use client';

import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { Controller, useForm, type FieldErrors, type Resolver } from 'react-hook-form';
import { apiFetch, ApiError } from '@/components/session/api';
import { Button } from '@/components/ui/button';
import { FormField, inputClass } from '@/components/ui/form-field';
import { displayToMm, lengthUnit, mmToDisplay } from '@/lib/display-units';
import type { ScrewInput } from '@/lib/fleet/footprint';
import { machineInput, type MachineInput } from '@/lib/fleet/machines';
import { convertLength, convertSlope, type UnitSystem } from '@/lib/leveling/units';
import { FootprintEditor } from './footprint-editor';

type LengthKey = 'tableLengthMm' | 'tableWidthMm' | 'travelXMm' | 'travelYMm' | 'travelZMm';
const LENGTHS: [LengthKey, string][] = [
  ['tableLengthMm', 'Table length (X)'],
  ['tableWidthMm', 'Table width (Y)'],
  ['travelXMm', 'X travel'],
  ['travelYMm', 'Y travel'],
  ['travelZMm', 'Z travel'],
];

/** What the form holds: numbers as typed (in the user's units); the screws and ids as the API takes them. */
type FormValues = Pick<MachineInput, 'siteId' | 'model' | 'serial' | 'screws'> &
  Record<LengthKey | 'checkIntervalMonths' | 'twistTol' | 'bowTol' | 'sweepTol', string> & { priorLeveledOn: string };

/** A typed number: blank is NaN for a required field (the schema then says "must be a number"). */
const required = (typed: string) => (typed.trim() === '' ? Number.NaN : Number(typed));
/** A typed number for an optional field: blank means "not set". */
const optional = (typed: string | null | undefined) => (typed == null || typed.trim() === '' ? null : Number(typed));
const shown = (v: number | null | undefined) => (v == null ? '' : String(v));

const slopeUnit = (u: UnitSystem) => (u === 'inch' ? 'in/10in' : 'um/m');
const slopeLabel = (u: UnitSystem) => (u === 'inch' ? 'in per 10 in' : 'µm/m');

/** Converts a finite value; a missing or non-numeric one passes through for the schema to name. */
const through = (x: number | null, convert: (v: number) => number) => (x === null || !Number.isFinite(x) ? x : convert(x));

function toPayload(v: FormValues, u: UnitSystem): unknown {
  const payload: Record<string, unknown> = {
    siteId: v.siteId,
    model: v.model,
    serial: v.serial,
    checkIntervalMonths: required(v.checkIntervalMonths),
    priorLeveledOn: v.priorLeveledOn || null,
    twistTolUrad: through(optional(v.twistTol), (x) => convertSlope(x, slopeUnit(u), 'urad')),
    bowTolUrad: through(optional(v.bowTol), (x) => convertSlope(x, slopeUnit(u), 'urad')),
    sweepTolUm: through(optional(v.sweepTol), (x) => (u === 'inch' ? convertLength(x, 'in', 'um') : x)),
    screws: v.screws,
  };
  for (const [k] of LENGTHS) payload[k] = through(required(v[k]), (x) => displayToMm(x, u));
  return payload;
}

/** Checks with the same zod schema as the route, after converting the user's units to the stored ones. */
function resolverFor(u: UnitSystem): Resolver<FormValues> {
  const formKey: Record<string, keyof FormValues> = { twistTolUrad: 'twistTol', bowTolUrad: 'bowTol', sweepTolUm: 'sweepTol' };
  return async (values) => {
    const res = machineInput.safeParse(toPayload(values, u));
    if (res.success) return { values, errors: {} };
    const errors: Record<string, { type: string; message: string }> = {};
    for (const issue of res.error.issues) {
      const head = String(issue.path[0] ?? 'root');
      const key = head === 'screws' ? 'screws' : (formKey[head] ?? head);
      errors[key] ??= { type: issue.code, message: issue.message };
    }
    return { values: {}, errors: errors as FieldErrors<FormValues> };
  };
}

type Props = {
  unitSystem: UnitSystem;
  sites: { id: string; name: string; customerName: string }[];
  /** The machine to edit (lengths in mm); absent for a new machine. */
  machine?: { id: string } & MachineInput;
  readOnly?: boolean;
};

export function MachineForm({ unitSystem: u, sites, machine, readOnly = false }: Props) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const start: FormValues = machine
    ? {
        siteId: machine.siteId,
        model: machine.model,
        serial: machine.serial,
        screws: machine.screws,
        ...(Object.fromEntries(LENGTHS.map(([k]) => [k, shown(mmToDisplay(machine[k], u))])) as Record<LengthKey, string>),
        checkIntervalMonths: String(machine.checkIntervalMonths),
        twistTol: shown(machine.twistTolUrad == null ? null : convertSlope(machine.twistTolUrad, 'urad', slopeUnit(u))),
        bowTol: shown(machine.bowTolUrad == null ? null : convertSlope(machine.bowTolUrad, 'urad', slopeUnit(u))),
        sweepTol: shown(machine.sweepTolUm == null ? null : u === 'inch' ? Math.round(convertLength(machine.sweepTolUm, 'um', 'in') * 1e5) / 1e5 : machine.sweepTolUm),
        priorLeveledOn: machine.priorLeveledOn ?? '',
      }
    : {
        siteId: sites[0]?.id ?? '',
        model: '',
        serial: '',
        screws: [],
        ...(Object.fromEntries(LENGTHS.map(([k]) => [k, ''])) as Record<LengthKey, string>),
        checkIntervalMonths: '9',
        twistTol: '',
        bowTol: '',
        sweepTol: '',
        priorLeveledOn: '',
      };
  const form = useForm<FormValues>({ defaultValues: start, resolver: resolverFor(u), mode: 'onBlur' });
  const { register, handleSubmit, control, formState, watch, setError } = form;

  const save = useMutation({
    mutationFn: (v: FormValues) =>
      machine
        ? apiFetch<{ machine: { id: string } }>(`/api/machines/${machine.id}`, { method: 'PATCH', body: toPayload(v, u) })
        : apiFetch<{ machine: { id: string } }>('/api/machines', { method: 'POST', body: toPayload(v, u) }),
    onSuccess: async ({ machine: saved }) => {
      await queryClient.invalidateQueries({ queryKey: ['machines'] });
      router.push(`/fleet/machines/${saved.id}`);
      router.refresh();
    },
    onError: (e) => {
      if (e instanceof ApiError && e.field) setError(e.field.split('.')[0] as keyof FormValues, { message: e.message.replace(/^[^:]+: /, '') });
    },
  });

  const err = (name: keyof FormValues) => formState.errors[name]?.message as string | undefined;
  const unit = lengthUnit(u);
  const tableLength = required(watch('tableLengthMm'));
  const tableWidth = required(watch('tableWidthMm'));

  return (
    <form onSubmit={handleSubmit((v) => save.mutate(v))} noValidate className="grid gap-6">
      <fieldset disabled={readOnly} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        <FormField label="Site" error={err('siteId')}>
          <select {...register('siteId')} aria-invalid={Boolean(err('siteId'))} className={inputClass}>
            {sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.customerName} · {s.name}
              </option>
            ))}
          </select>
        </FormField>
        <FormField label="Model" error={err('model')}>
          <input {...register('model')} aria-invalid={Boolean(err('model'))} className={inputClass} />
        </FormField>
        <FormField label="Serial number" error={err('serial')}>
          <input {...register('serial')} aria-invalid={Boolean(err('serial'))} className={`${inputClass} tabular`} />
        </FormField>
        {LENGTHS.map(([k, label]) => (
          <FormField key={k} label={`${label} (${unit})`} error={err(k)}>
            <input inputMode="decimal" {...register(k)} aria-invalid={Boolean(err(k))} className={`${inputClass} tabular`} />
          </FormField>
        ))}
        <FormField label="Check every (months)" error={err('checkIntervalMonths')} hint="The trade checks every 6 to 12 months.">
          <input inputMode="numeric" {...register('checkIntervalMonths')} aria-invalid={Boolean(err('checkIntervalMonths'))} className={`${inputClass} tabular`} />
        </FormField>
        <FormField label="Last leveled before Levelwire" error={err('priorLeveledOn')} hint="From the paper record, if any.">
          <input type="date" {...register('priorLeveledOn')} aria-invalid={Boolean(err('priorLeveledOn'))} className={inputClass} />
        </FormField>
      </fieldset>

      <fieldset disabled={readOnly} className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-lg font-bold">Tolerances (blank: Levelwire&apos;s defaults)</legend>
        <FormField label={`Twist (${slopeLabel(u)})`} error={err('twistTol')} hint={u === 'inch' ? 'Default 0.0002' : 'Default 20'}>
          <input inputMode="decimal" {...register('twistTol')} aria-invalid={Boolean(err('twistTol'))} className={`${inputClass} tabular`} />
        </FormField>
        <FormField label={`Bow (${slopeLabel(u)})`} error={err('bowTol')} hint={u === 'inch' ? 'Default 0.0002' : 'Default 20'}>
          <input inputMode="decimal" {...register('bowTol')} aria-invalid={Boolean(err('bowTol'))} className={`${inputClass} tabular`} />
        </FormField>
        <FormField label={`Spindle sweep TIR (${u === 'inch' ? 'in' : 'µm'})`} error={err('sweepTol')} hint={u === 'inch' ? 'Default 0.0005 on a 10 in circle' : 'Default 12.7 on a 254 mm circle'}>
          <input inputMode="decimal" {...register('sweepTol')} aria-invalid={Boolean(err('sweepTol'))} className={`${inputClass} tabular`} />
        </FormField>
      </fieldset>

      <section className="grid gap-2">
        <h2 className="text-lg font-bold">Footprint: the leveling screws</h2>
        {err('screws') && (
          <p role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">
            {err('screws')}
          </p>
        )}
        <Controller
          control={control}
          name="screws"
          render={({ field }) => (
            <FootprintEditor
              value={field.value as ScrewInput[]}
              onChange={field.onChange}
              tableLengthMm={Number.isFinite(tableLength) ? displayToMm(tableLength, u) : 1000}
              tableWidthMm={Number.isFinite(tableWidth) ? displayToMm(tableWidth, u) : 500}
              unitSystem={u}
              readOnly={readOnly}
            />
          )}
        />
      </section>

      {!readOnly && (
        <div className="flex flex-wrap items-center gap-3">
          <Button type="submit" disabled={save.isPending}>
            {save.isPending ? 'Saving…' : machine ? 'Save machine' : 'Add machine'}
          </Button>
          {save.error && !(save.error instanceof ApiError && save.error.field) && (
            <p role="alert" className="font-semibold text-fail">
              {save.error.message}
            </p>
          )}
        </div>
      )}
    </form>
  );
}
