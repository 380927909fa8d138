import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { removeVisitInstrument } from '@/db/queries/visits';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { parseWith, route } from '@/lib/http';
import { visitInstrumentParams } from '../../../schema';
import { visitForInstruments } from '../access';

type Ctx = { params: Promise<{ id: string; instrumentId: string }> };

export const DELETE = route<Ctx>('visit', async (_req, { params }) => {
  const actor = await requireActor();
  const { id, instrumentId } = parseWith(visitInstrumentParams, await params, 'visit');
  await visitForInstruments(db(), actor, id);
  const removed = await removeVisitInstrument(db(), { visitId: id, instrumentId });
  if (!removed) throw new AppError('not_found:instrument', 'That instrument is not chosen for this visit');
  return NextResponse.json({ removed: true });
});
