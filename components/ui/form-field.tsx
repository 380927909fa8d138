import type { ReactNode } from 'react';

/** A labelled field with its error beside it (react-hook-form passes `error` from the shared zod schema). */
export function FormField({ label, error, hint, children }: { label: string; error?: string; hint?: string; children: ReactNode }) {
  return (
    <label className="grid content-start gap-1 font-semibold">
      {label}
      {children}
      {hint && !error && <span className="text-sm font-normal text-ink-soft">{hint}</span>}
      {error && (
        <span role="alert" className="text-sm font-semibold text-fail">
          {error}
        </span>
      )}
    </label>
  );
}

/** The input look every form shares: large, high-contrast, glove-friendly. */
export const inputClass = 'min-h-12 w-full rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal aria-[invalid=true]:border-fail';
