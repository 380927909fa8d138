import { convertLength, type UnitSystem } from '@/lib/leveling/units';

/** The length unit a user sees and types: inches for the inch system, millimetres for metric. */
export const lengthUnit = (system: UnitSystem) => (system === 'inch' ? 'in' : 'mm');

/** mm (stored) to the number shown in the user's system, rounded for display (0.001 in, 0.1 mm). */
export function mmToDisplay(mm: number, system: UnitSystem): number {
  return system === 'inch' ? Math.round(convertLength(mm, 'mm', 'in') * 1000) / 1000 : Math.round(mm * 10) / 10;
}

/** A number the user typed in their system back to mm. */
export function displayToMm(value: number, system: UnitSystem): number {
  return system === 'inch' ? convertLength(value, 'in', 'mm') : value;
}

/** Drag step in the footprint editor: 5 mm, or a quarter inch. */
export const snapMm = (system: UnitSystem) => (system === 'inch' ? 6.35 : 5);

/** A position along the travel, signed, in the user's unit: "+9.8 in" or "-250 mm". */
export function formatPosition(mm: number, system: UnitSystem): string {
  const v = system === 'inch' ? convertLength(mm, 'mm', 'in').toFixed(1) : String(Math.round(mm));
  return `${mm > 0 ? '+' : ''}${v} ${lengthUnit(system)}`;
}
