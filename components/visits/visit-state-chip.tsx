import { VISIT_STATE_LABEL, type VisitState } from '@/lib/fleet/visits';

const look: Record<VisitState, string> = {
  scheduled: 'bg-vial text-ink',
  in_progress: 'bg-bubble text-ink',
  completed: 'bg-pass text-white',
  cancelled: 'bg-rule text-ink',
};

export function VisitStateChip({ state }: { state: VisitState }) {
  return (
    <span data-state={state} className={`inline-block rounded-full px-3 py-1 text-sm font-bold whitespace-nowrap ${look[state]}`}>
      {VISIT_STATE_LABEL[state]}
    </span>
  );
}
