import type { SessionEvent } from '@/lib/session/events';

/**
 * Route handlers are bundled by Next apart from the process that owns socket.io, so they cannot import
 * the `io` instance. server.ts registers the broadcaster here (on globalThis, shared by every bundle in
 * the process); with the PostgreSQL adapter a broadcast reaches every process.
 */
type Broadcaster = (event: SessionEvent) => void;
const key = Symbol.for('levelwire.broadcast');
type Holder = { [key]?: Broadcaster };

export function setBroadcaster(fn: Broadcaster | undefined): void {
  (globalThis as Holder)[key] = fn;
}

export function broadcast(event: SessionEvent): void {
  (globalThis as Holder)[key]?.(event);
}
