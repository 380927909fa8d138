import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getCustomer, insertContact } from '@/db/queries/customers';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { jsonBody, parseWith, route } from '@/lib/http';
import { contactInput, idParams } from '../../schema';

type Ctx = { params: Promise<{ id: string }> };

export const POST = route<Ctx>('contact', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(idParams, await params, 'contact');
  const input = parseWith(contactInput, await jsonBody(req, 'contact'), 'contact');
  assertCan(actor, 'fleet:write');
  if (!(await getCustomer(db(), { organisationId: actor.organisationId, id }))) throw new AppError('not_found:customer', 'No such customer');
  const contact = await insertContact(db(), { organisationId: actor.organisationId, customerId: id, input });
  return NextResponse.json({ contact }, { status: 201 });
});
