import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getVisit, listVisitInstruments, updateVisit } from '@/db/queries/visits';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { calibrationStatus } from '@/lib/fleet/calibration';
import { todayUtc } from '@/lib/dates';
import { notifyVisit } from '@/lib/fleet/reminders';
import { jsonBody, parseWith, route } from '@/lib/http';
import { updateVisitInput, visitParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>('visit', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(visitParams, await params, 'visit');
  assertCan(actor, 'visit:read');
  const visit = await getVisit(db(), { organisationId: actor.organisationId, id });
  if (!visit) throw new AppError('not_found:visit', 'No such visit');
  const today = todayUtc();
  const chosen = await listVisitInstruments(db(), { visitId: id });
  return NextResponse.json({
    ...visit,
    instruments: chosen.map((i) => ({ ...i, status: calibrationStatus(i.calibrationDue, today) })),
  });
});

export const PATCH = route<Ctx>('visit', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(visitParams, await params, 'visit');
  const patch = parseWith(updateVisitInput, await jsonBody(req, 'visit'), 'visit');
  assertCan(actor, 'visit:write');
  const result = await updateVisit(db(), {
    organisationId: actor.organisationId,
    id,
    patch: { ...patch, scheduledFor: patch.scheduledFor ? new Date(patch.scheduledFor) : undefined },
  });
  if (!result) throw new AppError('not_found:visit', 'No such visit');
  const noticeSent = result.rescheduled ? await notifyVisit(db(), { organisationId: actor.organisationId, visitId: id, kind: 'rescheduled' }) : false;
  return NextResponse.json({ visit: result.visit, noticeSent });
});
