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
  for (const listener of listeners()) {
    try {
      listener(event);
    } catch {
      // a listener's failure must not undo a stored event's broadcast
    }
  }
}

/** In-process listeners to every stored event (the virtual technician of demo sessions listens here). */
const listenersKey = Symbol.for('levelwire.eventListeners');
type ListenersHolder = { [listenersKey]?: Set<Broadcaster> };
function listeners(): Set<Broadcaster> {
  const g = globalThis as ListenersHolder;
  g[listenersKey] ??= new Set();
  return g[listenersKey];
}

/** Calls `fn` after each stored event is broadcast in this process; returns the function that stops it. */
export function onStoredEvent(fn: Broadcaster): () => void {
  listeners().add(fn);
  return () => listeners().delete(fn);
}

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

/** In-process listeners to a socket joining a session's room (the virtual technician wakes when someone watches). */
type JoinListener = (sessionId: string, userId: string) => void;
const joinKey = Symbol.for('levelwire.joinListeners');
type JoinHolder = { [joinKey]?: Set<JoinListener> };
function joinListeners(): Set<JoinListener> {
  const g = globalThis as JoinHolder;
  g[joinKey] ??= new Set();
  return g[joinKey];
}

export function onSessionJoined(fn: JoinListener): () => void {
  joinListeners().add(fn);
  return () => joinListeners().delete(fn);
}

export function sessionJoined(sessionId: string, userId: string): void {
  for (const fn of joinListeners()) {
    try {
      fn(sessionId, userId);
    } catch {
      // a listener's failure must not fail the join
    }
  }
}
