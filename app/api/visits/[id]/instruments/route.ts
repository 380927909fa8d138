import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { addVisitInstrument, getInstrumentForVisit } from '@/db/queries/visits';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { assertUsable } from '@/lib/fleet/calibration';
import { todayUtc } from '@/lib/dates';
import { jsonBody, parseWith, route } from '@/lib/http';
import { visitInstrumentInput, visitParams } from '../../schema';
import { visitForInstruments } from './access';

type Ctx = { params: Promise<{ id: string }> };

/** Chooses an instrument for a visit. Its calibration must cover the visit's day (or today, if later), or an admin overrides with a reason. */
export const POST = route<Ctx>('visit', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(visitParams, await params, 'visit');
  const input = parseWith(visitInstrumentInput, await jsonBody(req, 'visit'), 'visit');
  const visit = await visitForInstruments(db(), actor, id);
  const instrument = await getInstrumentForVisit(db(), { organisationId: actor.organisationId, id: input.instrumentId });
  if (!instrument) throw new AppError('not_found:instrument', 'No such instrument');
  const today = todayUtc();
  const visitDay = todayUtc(visit.visit.scheduledFor);
  const onDay = visitDay > today ? visitDay : today;
  const { status, overridden } = assertUsable(instrument, onDay, input.overrideReason ? { byRole: actor.role, reason: input.overrideReason } : undefined);
  const row = await addVisitInstrument(db(), {
    visitId: id,
    instrumentId: instrument.id,
    serial: instrument.serial,
    override: overridden ? { reason: input.overrideReason!, byId: actor.id, at: new Date() } : undefined,
  });
  return NextResponse.json({ instrument: { ...row, serial: instrument.serial, calibrationDue: instrument.calibrationDue, status } }, { status: 201 });
});
