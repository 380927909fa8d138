// The demo's past records (db/seed-records.ts), as `npm test` seeded them: each verifies, folds to the state its row
// says, and left the machine within tolerance, so the replay, review, report and history have honest data to show.
import { and, asc, eq, ne } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { listEventsBySession } from '@/db/queries/events';
import { levelingSessions, machines } from '@/db/schema';
import { DEMO_MACHINE_SERIAL } from '@/db/seed';
import { stageVerdict } from '@/lib/session/derive';
import { foldEvents } from '@/lib/session/fold';
import { verifyChain } from '@/lib/session/hash-chain';
import { testDb } from './helpers/fixtures';

describe('demo records on the walkthrough machine', () => {
  it('holds two approved sessions and one waiting for review, each with an intact chain and a passing as-left', async () => {
    const db = testDb();
    const [machine] = await db.select().from(machines).where(eq(machines.serial, DEMO_MACHINE_SERIAL));
    const rows = await db
      .select()
      .from(levelingSessions)
      .where(and(eq(levelingSessions.machineId, machine!.id), ne(levelingSessions.state, 'live')))
      .orderBy(asc(levelingSessions.createdAt));
    expect(rows.map((r) => r.state)).toEqual(['approved', 'approved', 'ended']);
    for (const row of rows) {
      const events = await listEventsBySession(db, { sessionId: row.id });
      const verdict = verifyChain(events);
      expect(verdict).toEqual({ ok: true, count: row.lastSeq, head: row.lastHash });
      const s = foldEvents(events);
      expect(s.status).toBe(row.state);
      expect(s.stage).toBe('lock-as-left');
      expect(stageVerdict(s, 'lock-as-left')).toEqual({ status: 'pass', detail: [] });
      // Times run forward and the approval is the last event of an approved record.
      expect(events.every((e, i) => i === 0 || e.serverTs >= events[i - 1]!.serverTs)).toBe(true);
      if (row.state === 'approved') expect(s.review.approval?.seq).toBe(row.lastSeq);
      else expect(s.review.approval).toBeNull();
    }
    // Each is months apart, oldest first: a history, not three copies of one day.
    const days = rows.map((r) => r.createdAt.getTime() / 86_400_000);
    expect(days[1]! - days[0]!).toBeGreaterThan(200);
    expect(days[2]! - days[1]!).toBeGreaterThan(100);
  });
});
