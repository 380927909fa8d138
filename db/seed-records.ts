/**
 * The demo's past records on the walkthrough machine: two approved sessions (about 14 and 5 months ago) and one ended
 * yesterday, waiting for review. Each is played by the engine's simulator with the coach sending the recommended
 * moves, then written with times in the past and its hash chain made as the append would make it, so the replay,
 * the review, the report and the machine's history have something to show on a fresh `npm start`. Invented data.
 */
import { randomUUID } from 'node:crypto';
import { and, eq, inArray } from 'drizzle-orm';
import type { Db } from './client';
import { eventRow } from './queries/events';
import { getMachineSnapshot } from './queries/sessions';
import { instruments, levelingSessions, sessionEvents, sessionParticipants, visitInstruments, visits, type User } from './schema';
import type { EventType, PayloadOf, SessionEvent, Signature } from '@/lib/session/events';
import { eventHash } from '@/lib/session/hash-chain';
import { pickDemoSeed, simulateDemo } from '@/lib/session/virtual-technician';

const DAY = 86_400_000;

/** Seconds a technician plausibly spends on each kind of step (the simulator's log has no times). */
const STEP_SECONDS: Partial<Record<EventType, number>> = {
  'check:marked': 25,
  'reading:recorded': 70,
  'stage:entered': 40,
  'move:sent': 15,
  'move:answered': 150,
  'note:posted': 30,
};

/** A signature-like scrawl in a 360 × 110 pad, the same for the same name. */
export function demoSignature(name: string): Signature {
  let h = 7;
  for (const ch of name) h = (h * 31 + ch.charCodeAt(0)) % 9973;
  const strokes: number[][] = [];
  for (let word = 0; word < 2; word++) {
    const stroke: number[] = [];
    const x0 = 20 + word * 170;
    for (let i = 0; i <= 40; i++) {
      const x = x0 + i * 3.5;
      const y = 60 + Math.sin(i * 0.55 + h + word) * (18 + ((h >> word) % 9)) - i * 0.4;
      stroke.push(Math.round(x), Math.round(Math.max(5, Math.min(105, y))));
    }
    strokes.push(stroke);
  }
  strokes.push([30, 95, 330, 88]);
  return { width: 360, height: 110, strokes };
}

type People = { tech: User; expert: User; reviewer: User; admin: User };

/** Writes the three records when the machine has none besides live ones; true when it wrote. */
export async function seedDemoRecords(db: Db, input: { organisationId: string; machineId: string; people: People; now: Date }): Promise<boolean> {
  const { organisationId, machineId, people, now } = input;
  const existing = await db
    .select({ id: levelingSessions.id })
    .from(levelingSessions)
    .where(and(eq(levelingSessions.machineId, machineId), inArray(levelingSessions.state, ['ended', 'in_review', 'returned', 'approved'])))
    .limit(1);
  if (existing.length > 0) return false;

  const snapshot = await getMachineSnapshot(db, { organisationId, machineId });
  const machine = { ...snapshot, levelDivisionUrad: 20 };
  const orgInstruments = await db.select().from(instruments).where(eq(instruments.organisationId, organisationId));
  // The in-calibration 0.02 mm/m level and the in-calibration indicator.
  const chosen = orgInstruments.filter((i) => i.serial === 'LV-3141' || i.serial === 'TI-0077');

  const records = [
    { startsAt: new Date(now.getTime() - 425 * DAY), seedFrom: 101, approve: true },
    { startsAt: new Date(now.getTime() - 150 * DAY), seedFrom: 301, approve: true },
    { startsAt: new Date(now.getTime() - 1 * DAY), seedFrom: 501, approve: false },
  ];
  for (const record of records) {
    const seed = pickDemoSeed(machine, { first: record.seedFrom, maxRounds: 12 });
    const run = simulateDemo(machine, seed, { maxRounds: 12 });
    await db.transaction(async (tx) => {
      const [visit] = await tx
        .insert(visits)
        .values({
          organisationId,
          machineId,
          technicianId: people.tech.id,
          expertId: people.expert.id,
          scheduledFor: record.startsAt,
          state: 'completed',
          notes: 'Routine check of level, twist, bow and spindle sweep.',
          createdById: people.admin.id,
          reminderSentAt: record.startsAt,
          createdAt: new Date(record.startsAt.getTime() - 20 * DAY),
        })
        .returning();
      if (chosen.length > 0) await tx.insert(visitInstruments).values(chosen.map((i) => ({ visitId: visit!.id, instrumentId: i.id })));

      const sessionId = randomUUID();
      const events: SessionEvent[] = [];
      let prev = '';
      let clock = record.startsAt.getTime();
      const append = <T extends EventType>(type: T, payload: PayloadOf<T>, actor: User, seconds = STEP_SECONDS[type] ?? 20) => {
        clock += seconds * 1000;
        const e: SessionEvent = { sessionId, seq: events.length + 1, id: randomUUID(), type, payload, actorId: actor.id, actorRole: actor.role, clientTs: null, serverTs: new Date(clock).toISOString(), prevHash: prev, hash: '' };
        e.hash = eventHash(prev, e);
        prev = e.hash;
        events.push(e);
      };
      append('session:opened', { machineId, levelDivisionUrad: machine.levelDivisionUrad, virtualSeed: null, ...snapshot }, people.tech, 0);
      append('participant:added', { userId: people.tech.id, name: people.tech.name, part: 'technician' }, people.tech, 1);
      append('participant:added', { userId: people.expert.id, name: people.expert.name, part: 'expert' }, people.tech, 1);
      // The simulator's move ids derive from its log position: give each move a fresh id, kept between sent and answered.
      const moveIds = new Map<string, string>();
      const moveId = (old: string) => moveIds.get(old) ?? (moveIds.set(old, randomUUID()), moveIds.get(old)!);
      for (const e of run.log.slice(1)) {
        const actor = e.actorRole === 'expert' ? people.expert : people.tech;
        if (e.type === 'move:sent' || e.type === 'move:answered') {
          const p = e.payload as PayloadOf<'move:sent'>;
          append(e.type, { ...p, moveId: moveId(p.moveId) } as PayloadOf<typeof e.type>, actor);
        } else {
          append(e.type, e.payload, actor);
        }
      }
      append('session:ended', {}, people.tech, 120);
      let state: 'ended' | 'approved' = 'ended';
      let approvedAt: Date | null = null;
      if (record.approve) {
        clock += DAY;
        append('review:commented', { atSeq: 3, text: 'Readings complete; as-left within tolerance on every measure.' }, people.reviewer, 0);
        append('review:approved', { name: people.reviewer.name, signature: demoSignature(people.reviewer.name) }, people.reviewer, 300);
        state = 'approved';
        approvedAt = new Date(clock);
      }
      await tx.insert(levelingSessions).values({
        id: sessionId,
        organisationId,
        machineId,
        technicianId: people.tech.id,
        visitId: visit!.id,
        levelDivisionUrad: machine.levelDivisionUrad,
        state,
        approvedAt,
        createdAt: record.startsAt,
        lastSeq: events.length,
        lastHash: prev,
      });
      await tx.insert(sessionParticipants).values([
        { sessionId, userId: people.tech.id, part: 'technician' },
        { sessionId, userId: people.expert.id, part: 'expert' },
      ]);
      for (let i = 0; i < events.length; i += 500) {
        await tx.insert(sessionEvents).values(
          events.slice(i, i + 500).map(eventRow),
        );
      }
    });
  }
  return true;
}
