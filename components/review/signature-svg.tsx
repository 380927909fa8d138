import type { Signature } from '@/lib/session/events';
import { strokePaths } from './signature';

/** A stored signature drawn back, scaled to the width it is given. */
export function SignatureSvg({ signature, label, className = '' }: { signature: Signature; label: string; className?: string }) {
  return (
    <svg viewBox={`0 0 ${signature.width} ${signature.height}`} role="img" aria-label={label} data-testid="signature-svg" className={`w-full ${className}`}>
      {strokePaths(signature).map((d, i) => (
        <path key={i} d={d} fill="none" stroke="currentColor" strokeWidth={2.2} strokeLinecap="round" strokeLinejoin="round" />
      ))}
    </svg>
  );
}
