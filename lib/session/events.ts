/** Event types in the session log, past tense. One name for the stored type and the broadcast. */
export const EVENT_TYPES = ['session:opened', 'reading:recorded'] as const;
export type EventType = (typeof EVENT_TYPES)[number];

export type LevelReadingPayload = {
  kind: 'level';
  axis: 'x' | 'y';
  positionMm: number;
  divisions: number;
  /** The divisions converted with the session's level: µrad, positive = rising toward +axis. */
  slopeUrad: number;
};

export type SessionOpenedPayload = { machineId: string; levelDivisionUrad: number };

export type PayloadOf<T extends EventType> = T extends 'reading:recorded'
  ? LevelReadingPayload
  : T extends 'session:opened'
    ? SessionOpenedPayload
    : never;

/** A stored event as the API and the sockets carry it (times as ISO strings). */
export type SessionEvent<T extends EventType = EventType> = {
  sessionId: string;
  seq: number;
  id: string;
  type: T;
  payload: PayloadOf<T>;
  actorId: string | null;
  actorRole: string;
  clientTs: string | null;
  serverTs: string;
  prevHash: string;
  hash: string;
};
