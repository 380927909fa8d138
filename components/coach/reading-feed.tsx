import { formatPosition } from '@/lib/display-units';
import { convertLength, formatLength, type UnitSystem } from '@/lib/leveling/units';
import type { RecordedReading } from '@/lib/session/fold';
import type { SessionScrew } from '@/lib/session/events';
import { STAGE_GUIDES } from '@/lib/session/stages';

const div = (d: number) => `${d > 0 ? '+' : ''}${d} div`;

function describe(r: RecordedReading, screws: SessionScrew[], system: UnitSystem): [string, string] {
  switch (r.kind) {
    case 'level':
      return [`#${r.seq} ${r.axis.toUpperCase()} @ ${formatPosition(r.positionMm, system)}`, div(r.divisions)];
    case 'reversal':
      return [`#${r.seq} Reversal ${r.axis.toUpperCase()} ${div(r.firstDiv)} / ${div(r.secondDiv)}`, `zero error ${r.zeroErrorDiv.toFixed(2)} div${r.repeats ? '' : ' ✗'}`];
    case 'height': {
      const label = screws.find((s) => s.id === r.screwId)?.label ?? 'screw';
      const h = system === 'inch' ? `${convertLength(r.heightMm, 'mm', 'in').toFixed(3)} in` : `${r.heightMm.toFixed(2)} mm`;
      return [`#${r.seq} Height at ${label}`, h];
    }
    case 'sweep':
      return [`#${r.seq} Sweep`, `front ${formatLength(r.frontUm, system)} · back ${formatLength(r.backUm, system)} · left ${formatLength(r.leftUm, system)} · right ${formatLength(r.rightUm, system)}`];
  }
}

type FeedProps = {
  readings: RecordedReading[];
  screws: SessionScrew[];
  unitSystem: UnitSystem;
  /** The replay shows the feed as it stood at a moment: its own heading and empty text. */
  title?: string;
  emptyText?: string;
  /** Show only the newest this many (the replay of a long session would otherwise draw thousands of rows per frame). */
  limit?: number;
};

/** The readings as the technician records them, newest first. */
export function ReadingFeed({ readings, screws, unitSystem, title = 'Readings, live', emptyText = 'Waiting for the technician’s first reading.', limit }: FeedProps) {
  const shown = limit !== undefined && readings.length > limit ? readings.slice(-limit) : readings;
  return (
    <section aria-labelledby="feed-h" className="grid content-start gap-2 rounded-2xl border-2 border-rule bg-card p-3 text-sm">
      <h2 id="feed-h" className="text-lg font-bold">
        {title}
      </h2>
      <ol className="grid max-h-72 gap-1 overflow-auto" data-testid="reading-feed">
        {[...shown].reverse().map((r) => {
          const [what, value] = describe(r, screws, unitSystem);
          return (
            <li key={r.seq} className="flex flex-wrap justify-between gap-x-2 rounded-lg bg-paper px-3 py-1.5 tabular" title={STAGE_GUIDES[r.stage].title}>
              <span>{what}</span>
              <span className="text-right">{value}</span>
            </li>
          );
        })}
        {readings.length === 0 && <li className="text-ink-soft">{emptyText}</li>}
        {shown.length < readings.length && <li className="text-ink-soft">and {readings.length - shown.length} earlier readings</li>}
      </ol>
    </section>
  );
}
