/** Levelwire's mark: a vial with its bubble resting on a taut line. */
export function Wordmark({ className = '' }: { className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 font-bold tracking-tight ${className}`}>
      <svg width="34" height="20" viewBox="0 0 34 20" aria-hidden="true">
        <line x1="0" y1="17" x2="34" y2="17" stroke="currentColor" strokeWidth="2" />
        <rect x="4" y="2" width="26" height="11" rx="5.5" fill="var(--color-vial)" stroke="currentColor" strokeWidth="1.6" />
        <ellipse cx="17" cy="7.5" rx="4.5" ry="3" fill="var(--color-paper)" stroke="currentColor" strokeWidth="1.2" />
        <line x1="11" y1="2.5" x2="11" y2="12.5" stroke="currentColor" strokeWidth="1" />
        <line x1="23" y1="2.5" x2="23" y2="12.5" stroke="currentColor" strokeWidth="1" />
      </svg>
      <span>Levelwire</span>
    </span>
  );
}
