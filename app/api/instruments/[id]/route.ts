import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getInstrumentForOrganisation, toInstrumentView } from '@/db/queries/instruments';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { todayUtc } from '@/lib/dates';
import { changeInstrument } from '@/lib/fleet/instruments-service';
import { jsonBody, parseWith, route } from '@/lib/http';
import { instrumentParams, instrumentPatch } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>('instrument', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(instrumentParams, await params, 'instrument');
  assertCan(actor, 'instrument:read');
  const row = await getInstrumentForOrganisation(db(), { instrumentId: id, organisationId: actor.organisationId });
  if (!row) throw new AppError('not_found:instrument', 'No such instrument');
  return NextResponse.json({ instrument: toInstrumentView(row, todayUtc()) });
});

/** Changes an instrument (admin); `active: false` retires it. */
export const PATCH = route<Ctx>('instrument', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(instrumentParams, await params, 'instrument');
  const patch = parseWith(instrumentPatch, await jsonBody(req, 'instrument'), 'instrument');
  assertCan(actor, 'instrument:write');
  const row = await changeInstrument(db(), { organisationId: actor.organisationId, instrumentId: id, patch });
  return NextResponse.json({ instrument: toInstrumentView(row, todayUtc()) });
});
