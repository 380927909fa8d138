import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { listSessionsForUser, openSession } from '@/db/queries/sessions';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { jsonBody, parseWith, route } from '@/lib/http';
import { broadcast } from '@/lib/realtime/bus';
import { openSessionInput } from './schema';

/** The sessions the caller may see: their own (any part), or every one of the organisation for reviewers and admins. */
export const GET = route('session', async () => {
  const actor = await requireActor();
  assertCan(actor, 'session:view');
  const rows = await listSessionsForUser(db(), {
    organisationId: actor.organisationId,
    userId: actor.id,
    readsAll: actor.role === 'reviewer' || actor.role === 'admin',
  });
  const sessions = rows.map((r) => ({
    id: r.id,
    state: r.state,
    createdAt: r.createdAt.toISOString(),
    lastSeq: r.lastSeq,
    demo: r.demo,
    standing: r.standing,
    machine: { id: r.machineId, model: r.machineModel, serial: r.machineSerial },
    site: { name: r.siteName },
    customer: { name: r.customerName },
    technician: { id: r.technicianId, name: r.technicianName },
  }));
  return NextResponse.json({ sessions });
});

/** Opens a live session (technicians): the caller measures, the experts coach, the observers watch. */
export const POST = route('session', async (req) => {
  const actor = await requireActor();
  const input = parseWith(openSessionInput, await jsonBody(req, 'session'), 'session');
  assertCan(actor, 'session:open');
  const { session, events } = await openSession(db(), { ...input, organisationId: actor.organisationId, technician: { id: actor.id, name: actor.name } });
  events.forEach(broadcast);
  return NextResponse.json({ session: { id: session.id, state: session.state, lastSeq: session.lastSeq } }, { status: 201 });
});
