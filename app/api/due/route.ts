import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getReminderDaysBefore, listDueMachines } from '@/db/queries/due';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { todayUtc } from '@/lib/dates';
import { parseWith, route } from '@/lib/http';
import { searchParamsOf } from '@/lib/list-query';
import { dueListQuery } from './schema';

export const GET = route('due', async (req) => {
  const actor = await requireActor();
  const query = parseWith(dueListQuery, searchParamsOf(req), 'due');
  assertCan(actor, 'fleet:read');
  const organisationId = actor.organisationId;
  const soonDays = query.soonDays ?? (await getReminderDaysBefore(db(), { organisationId }));
  const page = await listDueMachines(db(), { ...query, organisationId, soonDays, today: todayUtc(new Date()) });
  return NextResponse.json({ ...page, soonDays });
});
