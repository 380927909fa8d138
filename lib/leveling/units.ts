import { requireFinite } from './errors';

/** Millimetres in one inch: exactly 25.4 (international inch, 1959). */
export const MM_PER_IN = 25.4;

/** Microradians in one arc-second: π/648000 rad × 10⁶ (definition of the arc-second). */
export const URAD_PER_ARCSEC = (Math.PI / 648000) * 1e6;

/** A slope unit; small angles, so µrad, µm/m and rise over run share one number. */
export type SlopeUnit = 'urad' | 'mm/m' | 'um/m' | 'in/in' | 'in/10in' | 'in/ft' | 'arcsec';

/** A length unit; `tenths` is the machinist's 0.0001 in. */
export type LengthUnit = 'mm' | 'um' | 'in' | 'tenths';

/** How figures are shown to a user. */
export type UnitSystem = 'inch' | 'metric';

const URAD_PER_SLOPE_UNIT: Record<SlopeUnit, number> = {
  urad: 1,
  'um/m': 1,
  'mm/m': 1000,
  'in/in': 1e6,
  'in/10in': 1e5,
  'in/ft': 1e6 / 12,
  arcsec: URAD_PER_ARCSEC,
};

const MM_PER_LENGTH_UNIT: Record<LengthUnit, number> = {
  mm: 1,
  um: 0.001,
  in: MM_PER_IN,
  tenths: MM_PER_IN / 10000,
};

/** Converts a slope between units; sign is kept (positive stays positive). */
export function convertSlope(value: number, from: SlopeUnit, to: SlopeUnit): number {
  requireFinite('slope', value);
  if (from === to) return value;
  return (value * URAD_PER_SLOPE_UNIT[from]) / URAD_PER_SLOPE_UNIT[to];
}

/** Converts a length between units; sign is kept. */
export function convertLength(value: number, from: LengthUnit, to: LengthUnit): number {
  requireFinite('length', value);
  if (from === to) return value;
  return (value * MM_PER_LENGTH_UNIT[from]) / MM_PER_LENGTH_UNIT[to];
}

/** A slope in µrad as display text: in/10 in to 0.00001 (inch) or mm/m to 0.001 (metric). */
export function formatSlope(slopeUrad: number, system: UnitSystem): string {
  return system === 'inch'
    ? `${convertSlope(slopeUrad, 'urad', 'in/10in').toFixed(5)} in/10 in`
    : `${convertSlope(slopeUrad, 'urad', 'mm/m').toFixed(3)} mm/m`;
}

/** A length in µm as display text: inches to a tenth (inch), µm to 0.1 below 1 mm or mm to 0.001 (metric). */
export function formatLength(lengthUm: number, system: UnitSystem): string {
  if (system === 'inch') return `${convertLength(lengthUm, 'um', 'in').toFixed(4)} in`;
  return Math.abs(lengthUm) < 1000
    ? `${lengthUm.toFixed(1)} µm`
    : `${convertLength(lengthUm, 'um', 'mm').toFixed(3)} mm`;
}
