import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { listSessionsByOrganisation, openSession } from '@/db/queries/sessions';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { jsonBody, parseWith, route } from '@/lib/http';
import { broadcast } from '@/lib/realtime/bus';
import { openSessionInput } from './schema';

export const GET = route('session', async () => {
  const actor = await requireActor();
  assertCan(actor, 'session:view');
  const sessions = await listSessionsByOrganisation(db(), { organisationId: actor.organisationId });
  return NextResponse.json({ sessions });
});

export const POST = route('session', async (req) => {
  const actor = await requireActor();
  const input = parseWith(openSessionInput, await jsonBody(req, 'session'), 'session');
  assertCan(actor, 'session:open');
  const { session, events } = await openSession(db(), { ...input, organisationId: actor.organisationId, technician: { id: actor.id, name: actor.name } });
  events.forEach(broadcast);
  return NextResponse.json({ session: { id: session.id, state: session.state } }, { status: 201 });
});
