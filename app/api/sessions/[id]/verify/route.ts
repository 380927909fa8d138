import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { listEventsBySession } from '@/db/queries/events';
import { requireActor } from '@/lib/auth/session';
import { parseWith, route } from '@/lib/http';
import { verifyChain } from '@/lib/session/hash-chain';
import { accessSession } from '@/lib/session/service';
import { sessionParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

/**
 * Recomputes the session's hash chain from what is stored: `{ ok, count, head }`, or `{ ok: false, brokenAtSeq,
 * reason }` naming the first broken link. Anyone who may read the session may ask.
 */
export const GET = route<Ctx>('session', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'session');
  await accessSession(db(), actor, id);
  const verdict = verifyChain(await listEventsBySession(db(), { sessionId: id }));
  return NextResponse.json({ verdict, checkedAt: new Date().toISOString() });
});
