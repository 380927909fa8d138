/**
 * Figures of the report as text in one unit system, through lib/leveling's display helpers (the same strings the
 * views show), and text made safe for the PDF's standard fonts. Pure.
 */
import { formatLength, formatSlope, type UnitSystem } from '@/lib/leveling/units';
import type { MeasureRow } from '@/lib/session/summary';

/** A measure's value in `units`: slopes in in/10 in or mm/m, indicator figures in in or µm; signed measures carry + or -. */
export function measureText(value: number, row: Pick<MeasureRow, 'unit' | 'signed'>, units: UnitSystem): string {
  const magnitude = row.unit === 'urad' ? formatSlope(Math.abs(value), units) : formatLength(Math.abs(value), units);
  return row.signed ? `${signOf(value, magnitude)}${magnitude}` : magnitude;
}

/** '+' or '-' for a value whose shown digits are not all zero ("0.0000 in" carries no sign). */
function signOf(value: number, shown: string): string {
  // Only the number counts: the unit "in/10 in" has digits of its own.
  if (!/[1-9]/.test(shown.split(' ')[0] ?? '')) return '';
  return value > 0 ? '+' : value < 0 ? '-' : '';
}

/** A measure's tolerance in words: "± 0.020 mm/m" for signed measures, "max 0.020 mm/m" otherwise, "no limit" when none. */
export function toleranceText(row: Pick<MeasureRow, 'unit' | 'signed' | 'tolerance'>, units: UnitSystem): string {
  if (row.tolerance === null) return 'no limit';
  const t = row.unit === 'urad' ? formatSlope(row.tolerance, units) : formatLength(row.tolerance, units);
  return row.signed ? `± ${t}` : `max ${t}`;
}

/** A height in mm as display text in `units`: inches to 0.0001, or mm to 0.001 (always mm, even below 1 mm). */
export function heightText(mm: number, units: UnitSystem): string {
  return units === 'inch' ? formatLength(mm * 1000, 'inch') : `${mm.toFixed(3)} mm`;
}

/** A signed height difference in mm: "+0.120 mm" or "-0.0047 in". */
export function signedHeightText(mm: number, units: UnitSystem): string {
  const shown = heightText(Math.abs(mm), units);
  return `${signOf(mm, shown)}${shown}`;
}

/** Turns with a sign to three places ("+0.250"), ASCII minus. */
export function turnsText(turns: number): string {
  const t = Math.abs(turns).toFixed(3);
  return `${turns > 0 ? '+' : turns < 0 && t !== '0.000' ? '-' : ''}${t}`;
}

/** The unit system in words, for the report's "figures in" line. */
export function unitsText(units: UnitSystem): string {
  return units === 'inch' ? 'inch: slopes in in/10 in, lengths in inches' : 'metric: slopes in mm/m, lengths in µm and mm';
}

/** A time as "2026-03-03 08:15 UTC" (the report does not know the reader's time zone). */
export function utcText(iso: string | Date): string {
  const d = typeof iso === 'string' ? new Date(iso) : iso;
  return `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

/** A span of milliseconds as "2 h 05 min" or "14 min". */
export function durationText(ms: number): string {
  const minutes = Math.round(ms / 60_000);
  const h = Math.floor(minutes / 60);
  const m = minutes % 60;
  return h > 0 ? `${h} h ${String(m).padStart(2, '0')} min` : `${m} min`;
}

// Characters the PDF's standard fonts (WinAnsi) can draw beyond Latin-1.
const WIN_ANSI_EXTRA = new Set('€‚ƒ„…†‡ˆ‰Š‹ŒŽ‘’“”•–—˜™š›œžŸ');
const REPLACE: Record<string, string> = { '−': '-', '≤': '<=', '≥': '>=', '→': '->', '←': '<-', '≈': '~', 'μ': 'µ', '✓': 'v' };

/** Text the standard PDF fonts can draw: a few signs spelled out, anything else outside WinAnsi as '?'. */
export function pdfSafe(text: string): string {
  let out = '';
  for (const ch of text) {
    const code = ch.codePointAt(0)!;
    if (code === 10 || (code >= 32 && code <= 126) || (code >= 160 && code <= 255) || WIN_ANSI_EXTRA.has(ch)) out += ch;
    else out += REPLACE[ch] ?? '?';
  }
  return out;
}

/** A file name part: letters, digits, dot, dash and underscore only. */
export function fileSafe(text: string): string {
  return text.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60) || 'machine';
}
