'use client';

import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { AppendingCommand } from '@/lib/realtime/contract';
import type { SessionEvent } from '@/lib/session/events';
import type { SessionStage } from '@/lib/session/stages';

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

/**
 * A photo taken while it could not be uploaded (or before its upload was answered): the image itself, kept until the
 * server has stored it; resent with the same id, which the server stores once.
 */
export type QueuedPhoto = {
  id: string;
  sessionId: string;
  /** Who took it: only its maker's signed-in views upload it, as for commands. */
  userId: string;
  stage: SessionStage;
  caption: string;
  file: Blob;
  fileName: string;
  queuedAt: number;
};

interface LevelwireDb extends DBSchema {
  outbox: { key: string; value: QueuedCommand; indexes: { bySession: [string, number] } };
  logs: { key: string; value: { sessionId: string; events: SessionEvent[] } };
  photos: { key: string; value: QueuedPhoto; indexes: { bySession: [string, number] } };
}

let opening: Promise<IDBPDatabase<LevelwireDb>> | null = null;

function database() {
  opening ??= openDB<LevelwireDb>('levelwire', 2, {
    upgrade(db, oldVersion) {
      if (oldVersion < 1) {
        const outbox = db.createObjectStore('outbox', { keyPath: 'id' });
        outbox.createIndex('bySession', ['sessionId', 'queuedAt']);
        db.createObjectStore('logs', { keyPath: 'sessionId' });
      }
      if (oldVersion < 2) db.createObjectStore('photos', { keyPath: 'id' }).createIndex('bySession', ['sessionId', 'queuedAt']);
    },
  });
  return opening;
}

/** Queues a command (written before it is sent, so it survives anything after this resolves). */
export async function enqueue(cmd: QueuedCommand): Promise<void> {
  await (await database()).put('outbox', cmd);
}

/** What waits in `store` for one session and one user, oldest first. */
async function waiting<S extends 'outbox' | 'photos'>(store: S, sessionId: string, userId: string): Promise<LevelwireDb[S]['value'][]> {
  const all = await (await database()).getAllFromIndex(store, 'bySession', IDBKeyRange.bound([sessionId, 0], [sessionId, Number.MAX_SAFE_INTEGER]));
  return all.filter((x) => x.userId === userId);
}

/** A session's commands queued by one user, in the order they were made. */
export const queued = (sessionId: string, userId: string): Promise<QueuedCommand[]> => waiting('outbox', sessionId, userId);

/** How many commands and photos on this device wait for one user, over every session (asked before signing out). */
export async function pendingFor(userId: string): Promise<number> {
  const db = await database();
  const [commands, photos] = await Promise.all([db.getAll('outbox'), db.getAll('photos')]);
  return [...commands, ...photos].filter((c) => c.userId === userId).length;
}

/** Keeps a photo until the server has it (written before the upload starts). */
export async function keepPhoto(photo: QueuedPhoto): Promise<void> {
  await (await database()).put('photos', photo);
}

/** A session's photos waiting for one user, oldest first. */
export const keptPhotos = (sessionId: string, userId: string): Promise<QueuedPhoto[]> => waiting('photos', sessionId, userId);

export async function dropPhoto(id: string): Promise<void> {
  await (await database()).delete('photos', id);
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
