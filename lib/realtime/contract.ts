import * as z from 'zod/mini';
import { checkMark, moveAnswer, moveSend, notePost, readingSubmit, sessionEnd, sessionJoin, stageEnter } from '@/lib/session/commands';
import { EVENT_TYPES, type SessionEvent } from '@/lib/session/events';
import type { AckError } from './protocol';

export { isRetryable, PROTOCOL_VERSION, SOCKET_PATH, type AckError } from './protocol';

/** Room names come from here, never from string literals elsewhere. */
export const sessionRoom = (sessionId: string) => `session:${sessionId}`;
/** Every socket of one user (joined at connection), so a deactivation can end them all. */
export const userRoom = (userId: string) => `user:${userId}`;

/** Inbound command schemas, by event name. */
export const commands = {
  'session:join': sessionJoin,
  'session:leave': z.strictObject({ sessionId: z.uuid() }),
  'reading:submit': readingSubmit,
  'stage:enter': stageEnter,
  'check:mark': checkMark,
  'move:send': moveSend,
  'move:answer': moveAnswer,
  'note:post': notePost,
  'session:end': sessionEnd,
  /** Round-trip probe for the presence panel: answers at once, stores nothing. */
  'link:ping': z.strictObject({ sessionId: z.uuid(), rttMs: z.optional(z.number().check(z.gte(0), z.lte(60_000))) }),
} as const;

/** Commands that append one event: their acknowledgement carries the event's seq. */
export const APPENDING_COMMANDS = ['reading:submit', 'stage:enter', 'check:mark', 'move:send', 'move:answer', 'note:post', 'session:end'] as const;
export type AppendingCommand = (typeof APPENDING_COMMANDS)[number];

export type CommandName = keyof typeof commands;

export type Ack<T> = ({ ok: true } & T) | { ok: false; error: AckError };

/** What each command's successful acknowledgement carries besides `ok: true`. */
export type CommandResults = {
  'session:join': { events: SessionEvent[]; presence: Presence[] };
  'session:leave': Record<string, never>;
  'link:ping': { serverTs: string };
} & { [N in AppendingCommand]: { seq: number; duplicate: boolean } };

/** Who is connected to a session now: not stored in the log (it changes with every reconnect). */
export type Presence = {
  userId: string;
  name: string;
  role: string;
  /** Since when this user has had a socket in the session's room (the earliest of their sockets), ISO time. */
  since: string;
  /** Latest round trip a client measured and reported, ms; null before the first probe. */
  rttMs: number | null;
  sockets: number;
};

export type JoinAck = Ack<CommandResults['session:join']>;
export type SubmitAck = Ack<CommandResults['reading:submit']>;

export type ClientToServerEvents = {
  [N in CommandName]: (payload: z.input<(typeof commands)[N]>, ack: (res: Ack<CommandResults[N]>) => void) => void;
};

/** Every stored event is broadcast under its own type name. */
export type ServerToClientEvents = { [K in (typeof EVENT_TYPES)[number]]: (event: SessionEvent) => void } & {
  'presence:changed': (update: { sessionId: string; presence: Presence[] }) => void;
  /** The server is closing (a deploy or restart): the connection drops next and the client reconnects by itself. */
  'server:restarting': (notice: { message: string }) => void;
};

export type SocketData = {
  actor: import('@/lib/auth/actor').Actor;
  protocol: number;
  connectedAt: string;
  rttMs: number | null;
  /** Sessions this socket has joined (for presence). */
  sessions: string[];
};

export { EVENT_TYPES };
