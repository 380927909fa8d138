import { z } from 'zod';
import { readingSubmit, sessionJoin } from '@/lib/session/commands';
import { EVENT_TYPES, type SessionEvent } from '@/lib/session/events';

/** Bumped when a command or event changes shape; clients send it in the handshake. */
export const PROTOCOL_VERSION = 1;

/** The socket.io path Levelwire listens on (kept apart from Next's own paths). */
export const SOCKET_PATH = '/realtime';

/** Room names come from here, never from string literals elsewhere. */
export const sessionRoom = (sessionId: string) => `session:${sessionId}`;
/** Every socket of one user (joined at connection), so a deactivation can end them all. */
export const userRoom = (userId: string) => `user:${userId}`;

/** Inbound command schemas, by event name. */
export const commands = {
  'session:join': sessionJoin,
  'session:leave': z.strictObject({ sessionId: z.uuid() }),
  'reading:submit': readingSubmit,
} as const;

export type CommandName = keyof typeof commands;

export type AckError = { code: string; message: string; field?: string };
export type Ack<T> = ({ ok: true } & T) | { ok: false; error: AckError };

/** What each command's successful acknowledgement carries besides `ok: true`. */
export type CommandResults = {
  'session:join': { events: SessionEvent[] };
  'session:leave': Record<string, never>;
  'reading:submit': { seq: number; duplicate: boolean };
};

export type JoinAck = Ack<CommandResults['session:join']>;
export type SubmitAck = Ack<CommandResults['reading:submit']>;

export type ClientToServerEvents = {
  [N in CommandName]: (payload: z.input<(typeof commands)[N]>, ack: (res: Ack<CommandResults[N]>) => void) => void;
};

/** Every stored event is broadcast under its own type name. */
export type ServerToClientEvents = { [K in (typeof EVENT_TYPES)[number]]: (event: SessionEvent) => void };

export type SocketData = { actor: import('@/lib/auth/actor').Actor; protocol: number };

export { EVENT_TYPES };
