'use client';

import { useId } from 'react';

type Props = {
  name: string;
  label: string;
  value: string;
  onChange: (text: string) => void;
  unit?: string;
  placeholder?: string;
  invalid?: boolean;
  /** Offer a ± key: phone number pads often have no minus. */
  signed?: boolean;
};

/** A number typed with gloves: large, with its unit beside it and a ± key for signed values. */
export function NumberField({ name, label, value, onChange, unit, placeholder, invalid = false, signed = false }: Props) {
  const id = useId();
  const flip = () => {
    const t = value.trim();
    if (t.startsWith('-')) onChange(t.slice(1));
    else onChange(t === '' ? '-' : `-${t.replace(/^\+/, '')}`);
  };
  return (
    <div className="grid gap-1">
      <label htmlFor={id} className="font-semibold">
        {label}
      </label>
      <div className="flex items-center gap-2">
        {signed && (
          <button type="button" onClick={flip} aria-label="Change sign" title="Change sign (+/−)" className="min-h-12 min-w-12 rounded-lg border-2 border-ink bg-card text-xl font-bold">
            ±
          </button>
        )}
        <input
          id={id}
          name={name}
          inputMode="decimal"
          autoComplete="off"
          value={value}
          onChange={(e) => onChange(e.target.value)}
          placeholder={placeholder}
          aria-invalid={invalid || undefined}
          className={`min-h-12 w-full min-w-0 rounded-lg border-2 px-3 text-lg tabular ${invalid ? 'border-fail bg-fail/5' : 'border-ink'}`}
        />
        {unit && <span className="shrink-0 font-semibold text-ink-soft">{unit}</span>}
      </div>
    </div>
  );
}
