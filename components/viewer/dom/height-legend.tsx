import { formatLength, type UnitSystem } from '@/lib/leveling/units';
import { HEIGHT_STOPS } from '../surface';

/** The tilt view's colour key: true heights (not exaggerated) relative to the table centre, in the user's units. */
export function HeightLegend({ peakUm, unitSystem }: { peakUm: number; unitSystem: UnitSystem }) {
  const show = (um: number) => `${um > 0 ? '+' : um < 0 ? '−' : ''}${formatLength(Math.abs(um), unitSystem)}`;
  return (
    <figure className="grid gap-1 text-sm" aria-label="Height colours">
      <figcaption className="font-semibold">Height vs. the table centre · green lines = the level’s stations</figcaption>
      <div className="h-3 w-56 rounded" style={{ background: `linear-gradient(to right, ${HEIGHT_STOPS.join(', ')})` }} />
      <div className="flex w-56 justify-between tabular text-xs">
        <span>{show(-peakUm)} low</span>
        <span>0</span>
        <span>high {show(peakUm)}</span>
      </div>
    </figure>
  );
}
