import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { insertVisit, listVisits } from '@/db/queries/visits';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { notifyVisit } from '@/lib/fleet/reminders';
import { jsonBody, parseWith, route } from '@/lib/http';
import { searchParamsOf } from '@/lib/list-query';
import { scheduleVisitInput, visitListQuery } from './schema';

export const GET = route('visit', async (req) => {
  const actor = await requireActor();
  const query = parseWith(visitListQuery, searchParamsOf(req), 'visit');
  assertCan(actor, 'visit:read');
  return NextResponse.json(await listVisits(db(), { organisationId: actor.organisationId, ...query }));
});

export const POST = route('visit', async (req) => {
  const actor = await requireActor();
  const input = parseWith(scheduleVisitInput, await jsonBody(req, 'visit'), 'visit');
  assertCan(actor, 'visit:write');
  const visit = await insertVisit(db(), { ...input, scheduledFor: new Date(input.scheduledFor), organisationId: actor.organisationId, createdById: actor.id });
  const noticeSent = await notifyVisit(db(), { organisationId: actor.organisationId, visitId: visit.id, kind: 'scheduled' });
  return NextResponse.json({ visit, noticeSent }, { status: 201 });
});
