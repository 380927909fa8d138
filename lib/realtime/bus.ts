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

/**
 * In-process listeners, on globalThis like the broadcaster (one set per process, whichever bundle asks). A listener
 * that throws does not stop the others, nor the action that called them.
 */
function listenerSet<A extends unknown[]>(name: string) {
  const setKey = Symbol.for(`levelwire.${name}`);
  const holder = globalThis as { [k: symbol]: Set<(...args: A) => void> | undefined };
  const set = () => (holder[setKey] ??= new Set());
  return {
    on(fn: (...args: A) => void): () => void {
      set().add(fn);
      return () => set().delete(fn);
    },
    emit(...args: A): void {
      for (const fn of set()) {
        try {
          fn(...args);
        } catch {
          // one listener's failure must not stop the others, nor the stored event's broadcast
        }
      }
    },
  };
}

const storedEvents = listenerSet<[SessionEvent]>('eventListeners');
const joins = listenerSet<[sessionId: string, userId: string]>('joinListeners');

export function broadcast(event: SessionEvent): void {
  (globalThis as Holder)[key]?.(event);
  storedEvents.emit(event);
}

/** Calls `fn` after each stored event is broadcast in this process (the virtual technician listens here). */
export const onStoredEvent = storedEvents.on;

/** Calls `fn` when a socket of this process joins a session's room (the virtual technician wakes when someone watches). */
export const onSessionJoined = joins.on;
export const sessionJoined = joins.emit;

/** Ends every live socket of one user (after a deactivation or a role change); registered by server.ts like the broadcaster. */
type UserSocketEnder = (userId: string) => void;
const enderKey = Symbol.for('levelwire.endUserSockets');
type EnderHolder = { [enderKey]?: UserSocketEnder };

export function setUserSocketEnder(fn: UserSocketEnder | undefined): void {
  (globalThis as EnderHolder)[enderKey] = fn;
}

export function endUserSockets(userId: string): void {
  (globalThis as EnderHolder)[enderKey]?.(userId);
}
