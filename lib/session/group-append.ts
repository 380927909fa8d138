import type { Db } from '@/db/client';
import { chainEvent, eventsByIds, insertChained, lockHeads, type Appended, type LockedHead, type NewEvent } from '@/db/queries/events';
import type { LevelingSession } from '@/db/schema';
import type { Actor } from '@/lib/auth/actor';
import { AppError, isDatabaseUnavailable } from '@/lib/errors';
import type { Part } from './events';

/**
 * One append waiting for the next group commit: who asks, what for, and how to build the event from the session's
 * locked head. `build` is plain and synchronous: it reads the head only (never the log), and refuses by throwing an
 * AppError before anything is stored.
 */
export type QueuedAppend = {
  actor: Actor;
  key: { sessionId: string; id: string; type: NewEvent['type'] };
  /** The session states the command is taken in. */
  states: readonly LevelingSession['state'][];
  /** The caller's standing from their part (throws 403), then whether it may send this command (throws 403). */
  admit: (part: Part | null) => void;
  /** The session's state check (throws 409). */
  assertState: (head: LockedHead) => void;
  build: (head: LockedHead) => NewEvent;
};

type Waiting = QueuedAppend & { resolve: (a: Appended) => void; reject: (e: unknown) => void };

/** Counters for benchmarks and tests: batches committed and appends in them. */
export type GroupStats = { batches: number; appends: number; largest: number; fallbacks: number };

/**
 * Group commit for the hot appends (level readings, notes, stage changes): what arrives while a batch is committing
 * waits, then goes in the next batch, one transaction for many sessions: the sessions' rows locked in id order, every
 * caller's part and every resent id read at once, each event chained to its session's head in arrival order, one
 * INSERT with the head updates, one COMMIT. Each caller is answered, and each event broadcast, after that commit.
 *
 * Checks and answers are exactly those of the single append (appendChecked): 404 for an absent or other
 * organisation's session, 403 for the wrong part, the stored event for a resent id (`duplicate`), 409 for a session
 * that is not live. One caller's refusal refuses only that caller. When the batch itself fails (not a refusal), each
 * of its appends is tried again alone, so one bad append cannot fail the others; a database outage fails them all
 * with the outage (retryable).
 *
 * One batch at a time by default: measured with `npm run bench:live` at 500 sessions, a second batch in flight cost
 * more CPU (both batches lock and write) than it saved in waiting, and the p99 was worse (docs/benchmarks.md).
 */
export class GroupAppender {
  private queue: Waiting[] = [];
  private inFlight = 0;
  readonly stats: GroupStats = { batches: 0, appends: 0, largest: 0, fallbacks: 0 };

  constructor(
    private readonly db: Db,
    private readonly options: { maxInFlight: number; maxBatch: number } = { maxInFlight: 1, maxBatch: 400 },
  ) {}

  append(job: QueuedAppend): Promise<Appended> {
    return new Promise<Appended>((resolve, reject) => {
      this.queue.push({ ...job, resolve, reject });
      this.pump();
    });
  }

  private pump(): void {
    while (this.inFlight < this.options.maxInFlight && this.queue.length > 0) {
      const batch = this.queue.splice(0, this.options.maxBatch);
      this.inFlight += 1;
      void this.commit(batch).finally(() => {
        this.inFlight -= 1;
        this.pump();
      });
    }
  }

  private async commit(batch: Waiting[]): Promise<void> {
    let outcomes: Outcome[];
    try {
      outcomes = await this.transaction(batch);
    } catch (e) {
      if (batch.length === 1 || isDatabaseUnavailable(e)) {
        for (const w of batch) w.reject(e);
        return;
      }
      // Not a refusal and not an outage: each append alone, so whichever one failed fails by itself.
      this.stats.fallbacks += 1;
      await Promise.all(batch.map((w) => this.commit([w])));
      return;
    }
    this.stats.batches += 1;
    this.stats.appends += batch.length;
    this.stats.largest = Math.max(this.stats.largest, batch.length);
    batch.forEach((w, i) => {
      const o = outcomes[i]!;
      if ('error' in o) w.reject(o.error);
      else w.resolve(o);
    });
  }

  private async transaction(batch: Waiting[]): Promise<Outcome[]> {
    const client = await this.db.$client.connect();
    let broken: unknown;
    try {
      await client.query('begin');
      const heads = await lockHeads(
        client,
        [...new Set(batch.map((w) => w.key.sessionId))].sort(),
        [...new Set(batch.map((w) => w.actor.id))],
      );
      const known = await eventsByIds(client, [...new Set(batch.map((w) => w.key.id))]);
      const stored: Appended['event'][] = [];
      const outcomes = batch.map((w): Outcome => {
        try {
          const head = heads.get(w.key.sessionId);
          if (!head || head.organisationId !== w.actor.organisationId) throw new AppError('not_found:session', 'No such session');
          w.admit((head.parts[w.actor.id] as Part | undefined) ?? null);
          const existing = known.get(w.key.id);
          if (existing) {
            if (existing.sessionId !== w.key.sessionId || existing.type !== w.key.type) throw new AppError('conflict:event', 'That event id is already used by another event');
            return { event: existing, duplicate: true };
          }
          w.assertState(head);
          const event = chainEvent(head, w.build(head));
          known.set(event.id, event);
          stored.push(event);
          return { event, duplicate: false };
        } catch (e) {
          if (e instanceof AppError) return { error: e };
          throw e;
        }
      });
      await insertChained(client, stored, heads);
      await client.query('commit');
      return outcomes;
    } catch (e) {
      broken = e;
      await client.query('rollback').catch(() => undefined);
      throw e;
    } finally {
      // A connection that failed mid-transaction is not given back to the pool for reuse.
      client.release(broken !== undefined && isDatabaseUnavailable(broken) ? (broken as Error) : undefined);
    }
  }
}

type Outcome = Appended | { error: AppError };

// On globalThis, like the pool and the broadcaster: Next bundles its routes apart from server.ts, and a queue per
// bundle would split the process's batches in two.
const key = Symbol.for('levelwire.groupAppenders');
const holder = globalThis as { [key]?: WeakMap<Db, GroupAppender> };

/** The process's group appender for `db` (one queue per pool). */
export function groupAppender(db: Db): GroupAppender {
  const appenders = (holder[key] ??= new WeakMap());
  let a = appenders.get(db);
  if (!a) {
    a = new GroupAppender(db);
    appenders.set(db, a);
  }
  return a;
}
