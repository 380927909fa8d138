import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getCustomer, updateCustomer } from '@/db/queries/customers';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { jsonBody, parseWith, route } from '@/lib/http';
import { customerPatch, idParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>('customer', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(idParams, await params, 'customer');
  assertCan(actor, 'fleet:read');
  const customer = await getCustomer(db(), { organisationId: actor.organisationId, id });
  if (!customer) throw new AppError('not_found:customer', 'No such customer');
  return NextResponse.json({ customer });
});

export const PATCH = route<Ctx>('customer', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(idParams, await params, 'customer');
  const input = parseWith(customerPatch, await jsonBody(req, 'customer'), 'customer');
  assertCan(actor, 'fleet:write');
  const customer = await updateCustomer(db(), { organisationId: actor.organisationId, id, input });
  if (!customer) throw new AppError('not_found:customer', 'No such customer');
  return NextResponse.json({ customer });
});
