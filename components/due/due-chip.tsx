import type { DueStatus } from '@/lib/fleet/due';

const look: Record<DueStatus, { label: string; className: string }> = {
  overdue: { label: 'Overdue', className: 'bg-fail text-white' },
  'due-soon': { label: 'Due soon', className: 'bg-bubble text-ink' },
  ok: { label: 'Fine', className: 'bg-pass text-white' },
};

/** A machine's due status in words and colour. */
export function DueChip({ status, neverLeveled = false }: { status: DueStatus; neverLeveled?: boolean }) {
  return (
    <span data-status={status} className={`inline-block rounded-full px-3 py-1 text-sm font-bold whitespace-nowrap ${look[status].className}`}>
      {neverLeveled ? 'Due now' : look[status].label}
    </span>
  );
}
