import { NextResponse } from 'next/server';
import * as z from 'zod/mini';
import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { jsonBody, parseWith, route } from '@/lib/http';
import { readingSubmit } from '@/lib/session/commands';
import { recordReading } from '@/lib/session/service';
import { sessionParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

const body = z.omit(readingSubmit, { sessionId: true });

/** Records a reading over HTTP (the same command as the socket's `reading:submit`). */
export const POST = route<Ctx>('reading', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'reading');
  const cmd = parseWith(body, await jsonBody(req, 'reading'), 'reading');
  const { event, duplicate } = await recordReading(db(), actor, { ...cmd, sessionId: id });
  return NextResponse.json({ seq: event.seq, duplicate, event }, { status: duplicate ? 200 : 201 });
});

export type ReadingPostBody = z.input<typeof body>;
