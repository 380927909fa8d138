import type { ButtonHTMLAttributes } from 'react';

type Tone = 'primary' | 'plain' | 'quiet';

const tones: Record<Tone, string> = {
  primary: 'bg-spirit text-white hover:bg-spirit-deep disabled:bg-ink-soft/40',
  plain: 'bg-card text-ink border-2 border-ink hover:bg-paper disabled:opacity-50',
  quiet: 'bg-transparent text-ink underline underline-offset-4 hover:text-spirit',
};

/** A button sized for gloved hands: at least 48 px tall. */
export function Button({ tone = 'primary', className = '', ...props }: ButtonHTMLAttributes<HTMLButtonElement> & { tone?: Tone }) {
  return (
    <button
      {...props}
      className={`inline-flex min-h-12 items-center justify-center gap-2 rounded-lg px-5 text-lg font-semibold transition-colors disabled:cursor-not-allowed ${tones[tone]} ${className}`}
    />
  );
}
