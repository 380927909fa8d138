import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { insertSite, listSites } from '@/db/queries/customers';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { siteInput } from '@/lib/fleet/customers';
import { jsonBody, parseWith, route } from '@/lib/http';
import { searchParamsOf } from '@/lib/list-query';
import { nameQuery } from '../customers/schema';

export const GET = route('site', async (req) => {
  const actor = await requireActor();
  const { q } = parseWith(nameQuery, searchParamsOf(req), 'site');
  assertCan(actor, 'fleet:read');
  return NextResponse.json({ sites: await listSites(db(), { organisationId: actor.organisationId, q }) });
});

export const POST = route('site', async (req) => {
  const actor = await requireActor();
  const input = parseWith(siteInput, await jsonBody(req, 'site'), 'site');
  assertCan(actor, 'fleet:write');
  const site = await insertSite(db(), { organisationId: actor.organisationId, input });
  if (!site) throw new AppError('bad_request:site', 'customerId: no such customer', 'customerId');
  return NextResponse.json({ site }, { status: 201 });
});
