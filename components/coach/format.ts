import { convertSlope, formatLength, formatSlope, type UnitSystem } from '@/lib/leveling/units';
import type { Part } from '@/lib/session/events';

/** What the viewer is in the session (the server's word for it): a participant's part, or a reader. */
export type Standing = Part | 'reader';

// One formatter for every call: toLocaleTimeString builds a new one each time, which a replay's long lists feel.
const CLOCK = new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit', second: '2-digit' });

/** A clock time for the session's logs, HH:MM:SS (the viewer's time zone). */
export function clock(iso: string): string {
  return CLOCK.format(new Date(iso));
}

/** A slope with its sign, in the user's units. */
export function signedSlope(urad: number, system: UnitSystem): string {
  const text = formatSlope(Math.abs(urad), system);
  return `${urad > 0 ? '+' : urad < 0 ? '−' : '±'}${text}`;
}

/** Just the number of a slope in the user's units (no unit), for dense figures and chart ticks. */
export function slopeNumber(urad: number, system: UnitSystem): string {
  return system === 'inch' ? convertSlope(urad, 'urad', 'in/10in').toFixed(5) : convertSlope(urad, 'urad', 'mm/m').toFixed(3);
}

export const slopeUnit = (system: UnitSystem) => (system === 'inch' ? 'in/10 in' : 'mm/m');

/** A raise (positive) or lowering of the base at a screw, µm, in words. */
export function raiseWords(raiseUm: number, system: UnitSystem): string {
  return `${raiseUm >= 0 ? 'raise' : 'lower'} ${formatLength(Math.abs(raiseUm), system)}`;
}

/** Turns with a sign, to three places. */
export function signedTurns(turns: number): string {
  return `${turns > 0 ? '+' : turns < 0 ? '−' : ''}${Math.abs(turns).toFixed(3)}`;
}

/** Degrees of wrench swing with a sign, whole degrees. */
export function signedDegrees(degrees: number): string {
  return `${degrees > 0 ? '+' : degrees < 0 ? '−' : ''}${Math.abs(Math.round(degrees))}°`;
}
