import type { LevelReadingPayload, SessionEvent } from './events';

export type RecordedReading = LevelReadingPayload & { seq: number; serverTs: string; actorId: string | null };

/** What a session looks like after its events: the one implementation, used by server, views and tests. */
export type SessionState = {
  seq: number;
  levelDivisionUrad: number | null;
  readings: RecordedReading[];
  /** Latest slope per axis, µrad (positive: rising toward +x / +y); null before the first reading. */
  slopeXUrad: number | null;
  slopeYUrad: number | null;
};

export const initialState: SessionState = { seq: 0, levelDivisionUrad: null, readings: [], slopeXUrad: null, slopeYUrad: null };

/** Applies one event; events at or below the state's seq are ignored, so replays are harmless. */
export function applyEvent(state: SessionState, e: SessionEvent): SessionState {
  if (e.seq <= state.seq) return state;
  const next = { ...state, seq: e.seq };
  switch (e.type) {
    case 'session:opened': {
      const p = e.payload as SessionEvent<'session:opened'>['payload'];
      return { ...next, levelDivisionUrad: p.levelDivisionUrad };
    }
    case 'reading:recorded': {
      const p = e.payload as LevelReadingPayload;
      const reading: RecordedReading = { ...p, seq: e.seq, serverTs: e.serverTs, actorId: e.actorId };
      return {
        ...next,
        readings: [...state.readings, reading],
        slopeXUrad: p.axis === 'x' ? p.slopeUrad : state.slopeXUrad,
        slopeYUrad: p.axis === 'y' ? p.slopeUrad : state.slopeYUrad,
      };
    }
    default:
      return next;
  }
}

export function foldEvents(events: readonly SessionEvent[], from: SessionState = initialState): SessionState {
  return events.reduce(applyEvent, from);
}
