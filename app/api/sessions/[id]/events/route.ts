import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { listEventsBySession } from '@/db/queries/events';
import { requireActor } from '@/lib/auth/session';
import { parseWith, route } from '@/lib/http';
import { accessSession } from '@/lib/session/service';
import { eventsQuery, sessionParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

/** The session's log after `?after=<seq>`: late joiners and reconnecting clients catch up here. */
export const GET = route<Ctx>('session', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'session');
  const { after } = parseWith(eventsQuery, Object.fromEntries(new URL(req.url).searchParams), 'session');
  await accessSession(db(), actor, id);
  const events = await listEventsBySession(db(), { sessionId: id, afterSeq: after });
  return NextResponse.json({ events });
});
