'use client';

import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { AppendingCommand } from '@/lib/realtime/contract';
import type { SessionEvent } from '@/lib/session/events';

/** A command waiting for the server's acknowledgement; kept in IndexedDB so a reload or a restart loses nothing. */
export type QueuedCommand = {
  id: string;
  sessionId: string;
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

/** A session's queued commands in the order they were made. */
export async function queued(sessionId: string): Promise<QueuedCommand[]> {
  const db = await database();
  return db.getAllFromIndex('outbox', 'bySession', IDBKeyRange.bound([sessionId, 0], [sessionId, Number.MAX_SAFE_INTEGER]));
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
