import { convertSlope, formatLength, formatSlope, type UnitSystem } from '@/lib/leveling';
import { SLOPE_UNIT_LABELS, type InstrumentView } from '@/lib/fleet/instruments';

/** A level's sensitivity as given, and converted into the reader's units: "0.02 mm/m per division (0.00020 in/10 in)". */
export function describeSensitivity(i: Pick<InstrumentView, 'sensitivityValue' | 'sensitivityUnit'>, system: UnitSystem): string {
  if (i.sensitivityValue == null || !i.sensitivityUnit) return '—';
  const converted = formatSlope(convertSlope(i.sensitivityValue, i.sensitivityUnit, 'urad'), system);
  return `${i.sensitivityValue} ${SLOPE_UNIT_LABELS[i.sensitivityUnit]} per division (${converted})`;
}

/** An indicator's resolution and range in the reader's units. */
export function describeIndicator(i: Pick<InstrumentView, 'resolutionUm' | 'rangeMm'>, system: UnitSystem): string {
  if (i.resolutionUm == null) return '—';
  const range = i.rangeMm == null ? '' : `, range ${formatLength(i.rangeMm * 1000, system)}`;
  return `resolution ${formatLength(i.resolutionUm, system)}${range}`;
}

/** Whole days from `today` to `dueOn` (both YYYY-MM-DD); negative once past. */
export function daysUntil(dueOn: string, today: string): number {
  return Math.round((Date.parse(`${dueOn}T00:00:00Z`) - Date.parse(`${today}T00:00:00Z`)) / 86_400_000);
}

export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} bytes`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(0)} KB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}
