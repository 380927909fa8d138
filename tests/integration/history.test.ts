// A machine's history over HTTP (real server, real database): the as-found and as-left of each ended session in time
// order, its state, the due date from the last approval; another organisation's machine does not exist.
import { randomUUID } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { beforeAll, describe, expect, it } from 'vitest';
import { openSession } from '@/db/queries/sessions';
import { users } from '@/db/schema';
import type { Actor } from '@/lib/auth/actor';
import { addMonths } from '@/lib/dates';
import { answerMove, approveRecord, endSession, recordReading, sendMove } from '@/lib/session/service';
import { makeOrganisation, PASSWORD, testDb, type OrgFixture } from './helpers/fixtures';
import { api, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
const cookies: Record<string, string> = {};
const actorOf = (u: OrgFixture['users']['technician']): Actor => ({ id: u.id, name: u.name, role: u.role, organisationId: u.organisationId, unitSystem: 'metric' });
const ids: string[] = [];

/** One session of rough leveling: a first round (as-found), a move answered done, a second round (as-left); ended unless `end` is false. */
async function session(xDiv: [number, number], { end = true } = {}) {
  const tech = actorOf(org.users.technician);
  const { session, events } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id] });
  const sessionId = session.id;
  const level = (axis: 'x' | 'y', divisions: number) =>
    recordReading(db, tech, { id: randomUUID(), sessionId, reading: { kind: 'level', stage: 'rough-level', axis, positionMm: 0, divisions } });
  await level('x', xDiv[0]);
  await level('y', -1);
  const screwId = (events[0]!.payload as { screws: { id: string }[] }).screws[0]!.id;
  const move = await sendMove(db, actorOf(org.users.expert), { id: randomUUID(), sessionId, stage: 'rough-level', screwId, turns: 0.1, recommended: false });
  await answerMove(db, tech, { id: randomUUID(), sessionId, moveId: move.event.id, outcome: 'done', turns: 0.1 });
  await level('x', xDiv[1]);
  await level('y', 0.5);
  if (end) await endSession(db, tech, { id: randomUUID(), sessionId });
  return sessionId;
}

beforeAll(async () => {
  org = await makeOrganisation(db, 'History');
  other = await makeOrganisation(db, 'Elsewhere');
  cookies.technician = await signInOverHttp(org.users.technician.email);
  cookies.reviewer = await signInOverHttp(org.users.reviewer.email);
  cookies.otherAdmin = await signInOverHttp(other.users.admin.email);
  // Two visits' sessions, then one still live (left out of the history).
  ids.push(await session([4, 0.5]));
  ids.push(await session([2, -0.5]));
  ids.push(await session([9, 1], { end: false }));
  await approveRecord(db, actorOf(org.users.reviewer), {
    id: randomUUID(),
    sessionId: ids[0]!,
    name: 'History reviewer',
    signature: { width: 300, height: 100, strokes: [[10, 10, 90, 40]] },
  });
});

type HistoryBody = {
  rows: { sessionId: string; status: string; mayOpen: boolean }[];
  series: Record<string, { asFound: { sessionId: string; value: number; at: string }[]; asLeft: { value: number }[]; tolerance: number }>;
  due: { lastLeveledOn: string | null; nextDueOn: string | null; status: string };
  machine: { id: string; checkIntervalMonths: number };
};

describe('GET /api/machines/:id/history', () => {
  it('401 signed out, 400 naming id, 404 for another organisation’s machine', async () => {
    expect((await api(`/api/machines/${org.machineId}/history`)).status).toBe(401);
    expect((await api('/api/machines/not-a-uuid/history', { cookie: cookies.technician })).json).toMatchObject({ status: 400, field: 'id' });
    expect((await api(`/api/machines/${org.machineId}/history`, { cookie: cookies.otherAdmin })).json).toMatchObject({ status: 404, code: 'not_found:machine' });
  });

  it('two ended sessions: two as-found points in time order, the live one left out, the approved one marked', async () => {
    const res = await api(`/api/machines/${org.machineId}/history`, { cookie: cookies.reviewer });
    expect(res.status).toBe(200);
    const body = res.json as unknown as HistoryBody;
    expect(body.rows.map((r) => [r.sessionId, r.status])).toEqual([
      [ids[0], 'approved'],
      [ids[1], 'ended'],
    ]);
    // 4 and 2 divisions of a 20 µrad/div level (0.02 mm/m, JIS B 7510): 80 and 40 µrad.
    expect(body.series.tiltX!.asFound.map((p) => [p.sessionId, p.value])).toEqual([
      [ids[0], 80],
      [ids[1], 40],
    ]);
    expect(body.series.tiltX!.asFound[0]!.at < body.series.tiltX!.asFound[1]!.at).toBe(true);
    expect(body.series.tiltX!.asLeft.map((p) => p.value)).toEqual([10, -10]);
    expect(body.series.tiltY!.asFound.map((p) => p.value)).toEqual([-20, -20]);
    expect(body.series.tiltY!.asLeft.map((p) => p.value)).toEqual([10, 10]);
    expect(body.series.twist!.asFound).toEqual([]);
    expect(body.rows.every((r) => r.mayOpen)).toBe(true);
  });

  it('the next due date is the check interval after the approval’s UTC day (issue 4’s rule)', async () => {
    const body = (await api(`/api/machines/${org.machineId}/history`, { cookie: cookies.technician })).json as unknown as HistoryBody;
    const today = new Date().toISOString().slice(0, 10);
    expect(body.due).toEqual({ lastLeveledOn: today, nextDueOn: addMonths(today, body.machine.checkIntervalMonths), status: 'ok' });
    // The technician took part in every session here, so may open each.
    expect(body.rows.map((r) => r.mayOpen)).toEqual([true, true]);
  });

  it('someone who took no part sees the history but may not open the sessions', async () => {
    const [observer] = await db
      .insert(users)
      .values({ organisationId: org.organisationId, role: 'technician', email: `bystander-${randomUUID().slice(0, 8)}@fixture.test`, name: 'History bystander', passwordHash: bcrypt.hashSync(PASSWORD, 4) })
      .returning();
    const body = (await api(`/api/machines/${org.machineId}/history`, { cookie: await signInOverHttp(observer!.email) })).json as unknown as HistoryBody;
    expect(body.rows).toHaveLength(2);
    expect(body.rows.map((r) => r.mayOpen)).toEqual([false, false]);
  });
});
