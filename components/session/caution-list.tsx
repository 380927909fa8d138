import { STANDING_CAUTIONS } from '@/lib/session/stages';

/** A stage's own cautions (bold) followed by the cautions every stage repeats. */
export function CautionList({ cautions, className }: { cautions: readonly string[]; className: string }) {
  return (
    <ul className={className}>
      {cautions.map((c) => (
        <li key={c} className="font-semibold">
          {c}
        </li>
      ))}
      {STANDING_CAUTIONS.map((c) => (
        <li key={c}>{c}</li>
      ))}
    </ul>
  );
}
