/**
 * Plain functions behind the field view: what the outbox still holds, conversions from what the technician types
 * to what the commands carry, and the words for a move. No React, no browser: unit tests import these directly.
 */
import type { $ZodError } from 'zod/v4/core';
import { convertLength, type UnitSystem } from '@/lib/leveling/units';
import type { ReadingInput } from '@/lib/session/commands';
import { readingKey, type PlannedReading } from '@/lib/session/derive';
import type { MoveState, RecordedReading } from '@/lib/session/fold';
import type { SessionStage } from '@/lib/session/stages';

/** The part of a queued command the field view reads (the outbox's QueuedCommand has more). */
export type Queued = { id: string; name: string; payload: Record<string, unknown>; queuedAt: number };

/** A reading typed in but not yet acknowledged by the server, in the order it was entered. */
export type PendingReading = { id: string; reading: ReadingInput & { stage?: SessionStage }; queuedAt: number };

/** Readings still in the outbox, oldest first. */
export function pendingReadings(outbox: readonly Queued[]): PendingReading[] {
  return outbox
    .filter((c) => c.name === 'reading:submit' && typeof c.payload.reading === 'object' && c.payload.reading !== null)
    .map((c) => ({ id: c.id, reading: c.payload.reading as PendingReading['reading'], queuedAt: c.queuedAt }))
    .sort((a, b) => a.queuedAt - b.queuedAt);
}

/** The planned-reading key a typed reading answers (readingKey reads only kind, axis, position and screw). */
export function keyOfInput(r: PendingReading['reading']): string {
  return readingKey(r as unknown as RecordedReading);
}

/** The stage the technician last asked to enter that the server has not stored yet, or null. */
export function pendingStage(outbox: readonly Queued[]): SessionStage | null {
  let stage: SessionStage | null = null;
  let at = -Infinity;
  for (const c of outbox) {
    if (c.name === 'stage:enter' && typeof c.payload.stage === 'string' && c.queuedAt > at) {
      stage = c.payload.stage as SessionStage;
      at = c.queuedAt;
    }
  }
  return stage;
}

/** Moves whose answer waits in the outbox. */
export function answeredInOutbox(outbox: readonly Queued[]): Set<string> {
  return new Set(outbox.flatMap((c) => (c.name === 'move:answer' && typeof c.payload.moveId === 'string' ? [c.payload.moveId] : [])));
}

/** Checklist marks waiting in the outbox: the latest per item. */
export function pendingChecks(outbox: readonly Queued[]): Map<string, boolean> {
  const marks = new Map<string, boolean>();
  for (const c of [...outbox].sort((a, b) => a.queuedAt - b.queuedAt)) {
    if (c.name === 'check:mark' && typeof c.payload.item === 'string') marks.set(c.payload.item, c.payload.done === true);
  }
  return marks;
}

/** Notes waiting in the outbox, oldest first. */
export function pendingNotes(outbox: readonly Queued[]): { id: string; text: string }[] {
  return [...outbox]
    .sort((a, b) => a.queuedAt - b.queuedAt)
    .flatMap((c) => (c.name === 'note:post' && typeof c.payload.text === 'string' ? [{ id: c.id, text: c.payload.text }] : []));
}

/**
 * What the technician typed, as a number: blank is null (nothing entered), a decimal comma is read as a point,
 * a unicode minus as a minus; anything else that is not a number is NaN, which the shared schemas refuse by name.
 */
export function typedNumber(text: string): number | null {
  const t = text.trim().replace(',', '.').replace('\u2212', '-');
  if (t === '') return null;
  if (!/^[+-]?(\d+\.?\d*|\.\d+)$/.test(t)) return Number.NaN;
  return Number(t);
}

/** A height typed in the user's length unit (in or mm) to mm. */
export function heightToMm(value: number, system: UnitSystem): number {
  if (!Number.isFinite(value)) return value; // left for the schema to refuse by name
  return system === 'inch' ? convertLength(value, 'in', 'mm') : value;
}

/** An indicator value typed in the user's unit (inches, or µm for metric) to µm. */
export function indicatorToUm(value: number, system: UnitSystem): number {
  if (!Number.isFinite(value)) return value;
  return system === 'inch' ? convertLength(value, 'in', 'um') : value;
}

/** An indicator value (µm) as the technician reads it: inches to 0.00001 in, or µm to 0.1. */
export function formatIndicator(um: number, system: UnitSystem): string {
  return system === 'inch' ? `${convertLength(um, 'um', 'in').toFixed(5)} in` : `${um.toFixed(1)} µm`;
}

/** The unit the field view asks heights and indicator values in. */
export function entryUnits(system: UnitSystem): { height: string; indicator: string } {
  return system === 'inch' ? { height: 'in', indicator: 'in' } : { height: 'mm', indicator: 'µm' };
}

/** The field named in the user's words: the schema says `frontUm`, the form says `front`. */
const FORM_NAMES: Record<string, string> = { heightMm: 'height', frontUm: 'front', backUm: 'back', leftUm: 'left', rightUm: 'right', diameterMm: 'sweep diameter' };

/** The first problem of a failed parse, as "field: message", naming the form's field. */
export function fieldError(err: $ZodError): { field: string | null; message: string } {
  const issue = err.issues[0];
  if (!issue) return { field: null, message: 'invalid input' };
  const last = issue.path.at(-1);
  const field = typeof last === 'string' ? (FORM_NAMES[last] ?? last) : null;
  return { field, message: field ? `${field}: ${issue.message}` : issue.message };
}

/** A move in the technician's words: raise or lower, by how many turns and degrees of wrench swing (unsigned). */
export function moveWords(move: Pick<MoveState, 'raiseUm' | 'turns' | 'degrees'>): { direction: 'raise' | 'lower'; turns: number; degrees: number; liftUm: number } {
  return {
    direction: move.raiseUm >= 0 ? 'raise' : 'lower',
    turns: Math.abs(move.turns),
    degrees: Math.abs(move.degrees),
    liftUm: Math.abs(move.raiseUm),
  };
}

/** Turns as the technician reads them: up to three decimals, no trailing zeros. */
export function formatTurns(turns: number): string {
  return `${Number(turns.toFixed(3))} turn${Math.abs(turns) === 1 ? '' : 's'}`;
}

/** Where the instrument goes for a planned reading, in table coordinates (mm; +x right, +y to the back). */
export type Placement =
  | { kind: 'bar'; axis: 'x' | 'y'; xMm: number; yMm: number }
  | { kind: 'circle'; xMm: number; yMm: number; diameterMm: number }
  | { kind: 'screw'; screwId: string }
  | null;

/** Where the level (on the table's centre line), the sweep circle or the height gauge goes. */
export function placementOf(p: PlannedReading | null): Placement {
  if (!p) return null;
  switch (p.kind) {
    case 'level':
      return { kind: 'bar', axis: p.axis, xMm: 0, yMm: p.positionMm };
    case 'reversal':
      return { kind: 'bar', axis: p.axis, xMm: 0, yMm: 0 };
    case 'sweep':
      return { kind: 'circle', xMm: 0, yMm: 0, diameterMm: p.diameterMm };
    case 'height':
      return { kind: 'screw', screwId: p.screwId };
  }
}
