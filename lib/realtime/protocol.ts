// The parts of the realtime contract a browser needs at once, with no schema library: the field view loads this
// on first paint and zod only when it checks something (contract.ts re-exports all of it for everyone else).

/** Bumped when a command or event changes shape; clients send it in the handshake. */
export const PROTOCOL_VERSION = 2;

/** The socket.io path Levelwire listens on (kept apart from Next's own paths). */
export const SOCKET_PATH = '/realtime';

export type AckError = { code: string; message: string; field?: string };

/**
 * Whether a refused command stays in the sender's outbox and goes again: the server was closing or its database
 * was briefly away, so the command may or may not be stored; a resend with the same id is answered, never doubled.
 */
export function isRetryable(error: AckError): boolean {
  return error.code === 'offline:database' || error.code === 'offline:restarting';
}
