import type { CalibrationStatus } from '@/lib/fleet/calibration';
import { daysUntil } from './format';

const look: Record<CalibrationStatus, { label: string; className: string }> = {
  current: { label: 'Current', className: 'bg-pass text-white' },
  'due-soon': { label: 'Due soon', className: 'bg-bubble text-ink' },
  expired: { label: 'Expired', className: 'bg-fail text-white' },
};

/** The calibration status in words and colour, with the days left or past. */
export function CalibrationChip({ status, dueOn, today }: { status: CalibrationStatus; dueOn: string; today: string }) {
  const days = daysUntil(dueOn, today);
  const when = days < 0 ? `${-days} day${days === -1 ? '' : 's'} ago` : days === 0 ? 'due today' : `in ${days} day${days === 1 ? '' : 's'}`;
  return (
    <span className="inline-flex flex-wrap items-center gap-2">
      <span data-status={status} className={`rounded-full px-3 py-1 text-sm font-bold ${look[status].className}`}>
        {look[status].label}
      </span>
      <span className="text-sm text-ink-soft">{when}</span>
    </span>
  );
}
