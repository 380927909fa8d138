import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { addParticipant, listParticipants } from '@/db/queries/sessions';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { jsonBody, parseWith, route } from '@/lib/http';
import { broadcast } from '@/lib/realtime/bus';
import { accessSession } from '@/lib/session/service';
import { addParticipantInput, sessionParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

/** Who takes part in the session, with their parts (anyone who may see the session). */
export const GET = route<Ctx>('participant', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'participant');
  await accessSession(db(), actor, id);
  const rows = await listParticipants(db(), id);
  return NextResponse.json({ participants: rows.map((p) => ({ ...p, addedAt: p.addedAt.toISOString() })) });
});

/** Adds an expert or an observer (the session's technician, or an admin), while the session is live. */
export const POST = route<Ctx>('participant', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'participant');
  const input = parseWith(addParticipantInput, await jsonBody(req, 'participant'), 'participant');
  const { session, standing } = await accessSession(db(), actor, id);
  if (standing !== 'technician' && actor.role !== 'admin') {
    throw new AppError('forbidden:participant', 'Only the session’s technician or an admin adds people to it');
  }
  if (session.state !== 'live') throw new AppError('conflict:session', `The session is ${session.state.replace('_', ' ')}, not live`);
  const { event } = await addParticipant(db(), { organisationId: actor.organisationId, sessionId: id, userId: input.userId, part: input.part, actor });
  broadcast(event);
  return NextResponse.json({ seq: event.seq, participant: event.payload }, { status: 201 });
});
