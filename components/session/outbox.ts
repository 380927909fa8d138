'use client';

import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { AppendingCommand } from '@/lib/realtime/contract';
import type { SessionEvent } from '@/lib/session/events';

/** A command waiting for the server's acknowledgement; kept in IndexedDB so a reload or a restart loses nothing. */
export type QueuedCommand = {
  id: string;
  sessionId: string;
  /** Who made it: on a shared device, only its maker's signed-in views send it (never under another name). */
  userId: string;
  name: AppendingCommand;
  payload: Record<string, unknown> & { id: string; sessionId: string };
  queuedAt: number;
  attempts: number;
};

interface LevelwireDb extends DBSchema {
  outbox: { key: string; value: QueuedCommand; indexes: { bySession: [string, number] } };
  logs: { key: string; value: { sessionId: string; events: SessionEvent[] } };
}

let opening: Promise<IDBPDatabase<LevelwireDb>> | null = null;

function database() {
  opening ??= openDB<LevelwireDb>('levelwire', 1, {
    upgrade(db) {
      const outbox = db.createObjectStore('outbox', { keyPath: 'id' });
      outbox.createIndex('bySession', ['sessionId', 'queuedAt']);
      db.createObjectStore('logs', { keyPath: 'sessionId' });
    },
  });
  return opening;
}

/** Queues a command (written before it is sent, so it survives anything after this resolves). */
export async function enqueue(cmd: QueuedCommand): Promise<void> {
  await (await database()).put('outbox', cmd);
}

/** A session's commands queued by one user, in the order they were made. */
export async function queued(sessionId: string, userId: string): Promise<QueuedCommand[]> {
  const db = await database();
  const all = await db.getAllFromIndex('outbox', 'bySession', IDBKeyRange.bound([sessionId, 0], [sessionId, Number.MAX_SAFE_INTEGER]));
  return all.filter((c) => c.userId === userId);
}

/** How many commands on this device wait for one user, over every session (asked before signing out). */
export async function pendingFor(userId: string): Promise<number> {
  return (await (await database()).getAll('outbox')).filter((c) => c.userId === userId).length;
}

/**
 * Forgets what this device keeps for reading sessions without a network (cached logs and field pages), as a user
 * signs out; the outbox stays, each command tagged with its maker, and goes out when they sign in here again.
 */
export async function forgetLocalCopies(): Promise<void> {
  await (await database()).clear('logs');
  if ('caches' in window) for (const name of await caches.keys()) if (name.startsWith('levelwire-field-')) await caches.delete(name);
}

export async function dequeue(id: string): Promise<void> {
  await (await database()).delete('outbox', id);
}

export async function countAttempt(cmd: QueuedCommand): Promise<void> {
  await (await database()).put('outbox', { ...cmd, attempts: cmd.attempts + 1 });
}

/** The last log this browser saw of a session, for a reload without a network. */
export async function cachedLog(sessionId: string): Promise<SessionEvent[] | null> {
  return (await (await database()).get('logs', sessionId))?.events ?? null;
}

export async function cacheLog(sessionId: string, events: SessionEvent[]): Promise<void> {
  await (await database()).put('logs', { sessionId, events });
}
