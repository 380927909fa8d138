import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { insertInstrument, listInstrumentsByOrganisation, toInstrumentView } from '@/db/queries/instruments';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { todayUtc } from '@/lib/dates';
import { instrumentColumns } from '@/lib/fleet/instruments';
import { jsonBody, parseWith, route } from '@/lib/http';
import { searchParamsOf } from '@/lib/list-query';
import { instrumentInput, instrumentListQuery } from './schema';

export const GET = route('instrument', async (req) => {
  const actor = await requireActor();
  const { kind, status, ...query } = parseWith(instrumentListQuery, searchParamsOf(req), 'instrument');
  assertCan(actor, 'instrument:read');
  const page = await listInstrumentsByOrganisation(db(), { organisationId: actor.organisationId, query, kind, status, today: todayUtc() });
  return NextResponse.json(page);
});

export const POST = route('instrument', async (req) => {
  const actor = await requireActor();
  const input = parseWith(instrumentInput, await jsonBody(req, 'instrument'), 'instrument');
  assertCan(actor, 'instrument:write');
  const row = await insertInstrument(db(), { organisationId: actor.organisationId, values: instrumentColumns(input) });
  return NextResponse.json({ instrument: toInstrumentView(row, todayUtc()) }, { status: 201 });
});
