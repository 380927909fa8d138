import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { insertCustomer, listCustomers } from '@/db/queries/customers';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { jsonBody, parseWith, route } from '@/lib/http';
import { searchParamsOf } from '@/lib/list-query';
import { customerInput, nameQuery } from './schema';

export const GET = route('customer', async (req) => {
  const actor = await requireActor();
  const { q } = parseWith(nameQuery, searchParamsOf(req), 'customer');
  assertCan(actor, 'fleet:read');
  return NextResponse.json({ customers: await listCustomers(db(), { organisationId: actor.organisationId, q }) });
});

export const POST = route('customer', async (req) => {
  const actor = await requireActor();
  const input = parseWith(customerInput, await jsonBody(req, 'customer'), 'customer');
  assertCan(actor, 'fleet:write');
  const customer = await insertCustomer(db(), { organisationId: actor.organisationId, input });
  return NextResponse.json({ customer }, { status: 201 });
});
