'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { apiFetch, ApiError } from '@/components/session/api';
import { Button } from '@/components/ui/button';
import { FormField, inputClass } from '@/components/ui/form-field';
import { instrumentInput, SLOPE_UNIT_LABELS, SLOPE_UNITS, type InstrumentFormValues, type InstrumentInput, type InstrumentView } from '@/lib/fleet/instruments';
import { convertLength, type UnitSystem } from '@/lib/leveling/units';
import { INSTRUMENTS_KEY } from './instruments-table';

/** Empty text is "not given"; anything else must be a number (NaN is refused by the schema as "must be a number"). */
const asNumber = (v: unknown) => (v === '' || v == null ? null : Number(v));
const asDate = (v: unknown) => (v === '' || v == null ? null : String(v));

type Lengths = { resolutionUm?: number | null; rangeMm?: number | null };

/** An indicator's resolution and range as the user types them: inches for the inch system, µm and mm for metric. */
function lengthsShown<T extends Lengths>(v: T, u: UnitSystem): T {
  if (u === 'metric') return v;
  const conv = (x: number | null | undefined, from: 'um' | 'mm') => (x == null || !Number.isFinite(x) ? x : Math.round(convertLength(x, from, 'in') * 1e6) / 1e6);
  return { ...v, resolutionUm: conv(v.resolutionUm, 'um'), rangeMm: conv(v.rangeMm, 'mm') };
}

/** The typed figures back to what is stored (µm, mm); a blank or non-number passes through for the schema to name. */
function lengthsStored<T extends Lengths>(v: T, u: UnitSystem): T {
  if (u === 'metric') return v;
  const conv = (x: number | null | undefined, to: 'um' | 'mm') => (x == null || !Number.isFinite(x) ? x : convertLength(x, 'in', to));
  return { ...v, resolutionUm: conv(v.resolutionUm, 'um'), rangeMm: conv(v.rangeMm, 'mm') };
}

/** Adds an instrument (no `instrument`) or changes one (admin only); checked by the same schema as the route. */
export function InstrumentForm({ instrument, unitSystem }: { instrument?: InstrumentView; unitSystem: UnitSystem }) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const {
    register,
    handleSubmit,
    watch,
    setError,
    formState: { errors, isDirty },
    reset,
  } = useForm<InstrumentFormValues, unknown, InstrumentInput>({
    // The form holds the user's units; the shared schema checks the stored ones.
    resolver: (values, context, options) => zodResolver(instrumentInput)(lengthsStored(values, unitSystem), context, options),
    shouldUnregister: true,
    defaultValues: instrument
      ? lengthsShown({
          kind: instrument.kind,
          model: instrument.model,
          serial: instrument.serial,
          sensitivityValue: instrument.sensitivityValue,
          sensitivityUnit: instrument.sensitivityUnit,
          vialCount: instrument.vialCount,
          resolutionUm: instrument.resolutionUm,
          rangeMm: instrument.rangeMm,
          calibratedOn: instrument.calibratedOn,
          calibrationDue: instrument.calibrationDue,
        }, unitSystem)
      : { kind: 'level', sensitivityUnit: 'mm/m', vialCount: 2 },
  });
  const kind = watch('kind');

  const save = useMutation({
    mutationFn: (values: InstrumentInput) =>
      instrument
        ? apiFetch<{ instrument: InstrumentView }>(`/api/instruments/${instrument.id}`, { method: 'PATCH', body: values })
        : apiFetch<{ instrument: InstrumentView }>('/api/instruments', { method: 'POST', body: values }),
    onSuccess: async ({ instrument: saved }, values) => {
      await queryClient.invalidateQueries({ queryKey: INSTRUMENTS_KEY });
      if (instrument) {
        reset(lengthsShown(values, unitSystem));
        router.refresh();
      } else {
        router.push(`/instruments/${saved.id}`);
      }
    },
    onError: (e) => {
      if (e instanceof ApiError && e.field && e.field in instrumentInput.shape) {
        setError(e.field as keyof InstrumentFormValues, { message: e.message.replace(/^[\w.]+: /, '') });
      }
    },
  });

  const err = (name: keyof InstrumentFormValues) => errors[name]?.message;
  const formError = save.error && !(save.error instanceof ApiError && save.error.field) ? save.error.message : null;

  return (
    <form onSubmit={handleSubmit((v) => save.mutate(v))} noValidate className="grid gap-4 rounded-xl border-2 border-rule bg-card p-4 sm:p-6">
      <h2 className="text-xl font-bold">{instrument ? 'Change this instrument' : 'New instrument'}</h2>
      <div className="grid gap-4 sm:grid-cols-2">
        <FormField label="Kind" error={err('kind')}>
          <select {...register('kind')} className={inputClass} aria-invalid={Boolean(errors.kind)}>
            <option value="level">Precision level</option>
            <option value="indicator">Indicator</option>
          </select>
        </FormField>
        <FormField label="Serial" error={err('serial')}>
          <input {...register('serial')} className={inputClass} aria-invalid={Boolean(errors.serial)} autoComplete="off" />
        </FormField>
        <div className="sm:col-span-2">
          <FormField label="Model" error={err('model')} hint="As on the maker’s plate, e.g. “Precision level 200 mm”">
            <input {...register('model')} className={inputClass} aria-invalid={Boolean(errors.model)} autoComplete="off" />
          </FormField>
        </div>
        {kind === 'level' ? (
          <>
            <FormField label="Sensitivity per division" error={err('sensitivityValue')} hint="The slope one division of the vial stands for">
              <input {...register('sensitivityValue', { setValueAs: asNumber })} inputMode="decimal" className={inputClass} aria-invalid={Boolean(errors.sensitivityValue)} />
            </FormField>
            <FormField label="Sensitivity unit" error={err('sensitivityUnit')}>
              <select {...register('sensitivityUnit')} className={inputClass} aria-invalid={Boolean(errors.sensitivityUnit)}>
                {SLOPE_UNITS.map((u) => (
                  <option key={u} value={u}>
                    {SLOPE_UNIT_LABELS[u]}
                  </option>
                ))}
              </select>
            </FormField>
            <FormField label="Vials" error={err('vialCount')} hint="Main vial plus cross vial: 2">
              <input {...register('vialCount', { setValueAs: asNumber })} inputMode="numeric" className={inputClass} aria-invalid={Boolean(errors.vialCount)} />
            </FormField>
          </>
        ) : (
          <>
            <FormField label={`Resolution (${unitSystem === 'inch' ? 'in' : 'µm'})`} error={err('resolutionUm')} hint={unitSystem === 'inch' ? 'Smallest graduation, e.g. 0.0001' : 'Smallest graduation; 0.0001 in is 2.54 µm'}>
              <input {...register('resolutionUm', { setValueAs: asNumber })} inputMode="decimal" className={inputClass} aria-invalid={Boolean(errors.resolutionUm)} />
            </FormField>
            <FormField label={`Range (${unitSystem === 'inch' ? 'in' : 'mm'})`} error={err('rangeMm')}>
              <input {...register('rangeMm', { setValueAs: asNumber })} inputMode="decimal" className={inputClass} aria-invalid={Boolean(errors.rangeMm)} />
            </FormField>
          </>
        )}
        <FormField label="Calibrated on" error={err('calibratedOn')}>
          <input type="date" {...register('calibratedOn', { setValueAs: asDate })} className={inputClass} aria-invalid={Boolean(errors.calibratedOn)} />
        </FormField>
        <FormField label="Calibration due" error={err('calibrationDue')} hint="The last day the certificate covers">
          <input type="date" {...register('calibrationDue')} className={inputClass} aria-invalid={Boolean(errors.calibrationDue)} />
        </FormField>
      </div>
      {formError && (
        <p role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">
          {formError}
        </p>
      )}
      {save.isSuccess && instrument && !isDirty && (
        <p role="status" className="font-semibold text-pass">
          Saved.
        </p>
      )}
      <div className="flex flex-wrap gap-3">
        <Button type="submit" disabled={save.isPending}>
          {save.isPending ? 'Saving…' : instrument ? 'Save changes' : 'Add instrument'}
        </Button>
      </div>
    </form>
  );
}
