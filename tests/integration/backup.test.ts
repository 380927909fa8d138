// Backup and restore (scripts/backup.ts, Debian's pg_dump and pg_restore) against the test cluster: every session that
// existed at the dump comes back in a fresh database with its events, and each chain verifies to the head its row holds.
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { sql } from 'drizzle-orm';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { createDb } from '@/db/client';
import { appendEvent, listEventsBySession } from '@/db/queries/events';
import { openSession } from '@/db/queries/sessions';
import { levelingSessions } from '@/db/schema';
import { verifyChain } from '@/lib/session/hash-chain';
import { backupDatabase, databaseUrl, restoreDatabase } from '../../scripts/backup';
import { makeOrganisation, testDb } from './helpers/fixtures';

const db = testDb();
const url = process.env.DATABASE_URL!;
const folder = mkdtempSync(path.join(tmpdir(), 'levelwire-backup-'));
const restored = `levelwire_restore_${randomUUID().slice(0, 8)}`;

afterAll(async () => {
  rmSync(folder, { recursive: true, force: true });
  const admin = new pg.Client({ connectionString: databaseUrl(url, 'postgres') });
  await admin.connect();
  await admin.query(`drop database if exists "${restored}" with (force)`);
  await admin.end();
});

describe('backup and restore', () => {
  it('restores every session with its whole log into a fresh database, each chain intact; refuses to restore over a database', async () => {
    // At least one session of our own with more than its opening events.
    const org = await makeOrganisation(db, 'Backup');
    const opened = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: { id: org.users.technician.id, name: 'Backup technician' }, levelDivisionUrad: 20 });
    const sessionId = opened.session.id;
    await appendEvent(db, { sessionId, id: randomUUID(), type: 'note:posted', payload: { text: 'before the backup' }, actorId: org.users.technician.id, actorRole: 'technician' });

    const file = path.join(folder, 'levelwire.dump');
    const before = await db.select({ id: levelingSessions.id }).from(levelingSessions);
    const { bytes } = await backupDatabase(url, file);
    expect(bytes).toBeGreaterThan(0);
    // Written after the dump: not in the backup.
    await appendEvent(db, { sessionId, id: randomUUID(), type: 'note:posted', payload: { text: 'after the backup' }, actorId: org.users.technician.id, actorRole: 'technician' });

    const { url: restoredUrl } = await restoreDatabase(file, url, restored);
    const copy = createDb(restoredUrl, 2);
    try {
      const rows = await copy.select({ id: levelingSessions.id, lastSeq: levelingSessions.lastSeq, lastHash: levelingSessions.lastHash }).from(levelingSessions);
      const restoredIds = new Set(rows.map((r) => r.id));
      expect(before.every((b) => restoredIds.has(b.id))).toBe(true);
      for (const row of rows) {
        const events = await listEventsBySession(copy, { sessionId: row.id });
        expect(verifyChain(events), `session ${row.id}`).toEqual({ ok: true, count: row.lastSeq, head: row.lastHash });
      }
      const ours = await listEventsBySession(copy, { sessionId });
      expect(ours.map((e) => e.type).at(-1)).toBe('note:posted');
      expect(ours.some((e) => (e.payload as { text?: string }).text === 'after the backup')).toBe(false);
      // The log is still append-only in the copy (the trigger came back with the schema).
      await expect(copy.execute(sql`update session_events set actor_role = 'x' where session_id = ${sessionId}`)).rejects.toThrow();
    } finally {
      await copy.$client.end();
    }
    await expect(restoreDatabase(file, url, restored)).rejects.toThrow(/exists already/);
  });
});
