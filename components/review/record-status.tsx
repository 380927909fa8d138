import type { SessionStatus } from '@/lib/session/fold';

/** Where a record stands, in Levelwire's words (GLOSSARY: session states). */
export const STATUS_WORDS: Record<SessionStatus | 'planned', string> = {
  planned: 'Planned',
  live: 'Live',
  ended: 'Ended',
  in_review: 'In review',
  returned: 'Returned',
  approved: 'Approved',
};

const LOOK: Record<SessionStatus | 'planned', string> = {
  planned: 'bg-rule text-ink',
  live: 'bg-vial text-ink',
  ended: 'bg-steel text-paper',
  in_review: 'bg-bubble text-ink',
  returned: 'bg-fail text-white',
  approved: 'bg-pass text-white',
};

/** The record's status as a chip. */
export function StatusChip({ status, className = '' }: { status: SessionStatus | 'planned'; className?: string }) {
  return (
    <span data-testid="record-status" data-status={status} className={`inline-block rounded-full px-3 py-1 text-sm font-bold ${LOOK[status]} ${className}`}>
      {STATUS_WORDS[status]}
    </span>
  );
}
