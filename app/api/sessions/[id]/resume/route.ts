import { NextResponse } from 'next/server';
import * as z from 'zod/mini';
import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { jsonBody, parseWith, route } from '@/lib/http';
import { sessionResume } from '@/lib/session/commands';
import { resumeSession } from '@/lib/session/service';
import { sessionParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

const body = z.omit(sessionResume, { sessionId: true });
export type ResumePostBody = z.input<typeof body>;

/** The technician takes a returned session up again for rework (409 unless it was returned). */
export const POST = route<Ctx>('session', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'session');
  const cmd = parseWith(body, await jsonBody(req, 'session'), 'session');
  const { event, duplicate } = await resumeSession(db(), actor, { ...cmd, sessionId: id });
  return NextResponse.json({ seq: event.seq, duplicate, event }, { status: duplicate ? 200 : 201 });
});
