import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { deleteContact, updateContact } from '@/db/queries/customers';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { jsonBody, parseWith, route } from '@/lib/http';
import { contactPatch, idParams } from '../../customers/schema';

type Ctx = { params: Promise<{ id: string }> };

export const PATCH = route<Ctx>('contact', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(idParams, await params, 'contact');
  const input = parseWith(contactPatch, await jsonBody(req, 'contact'), 'contact');
  assertCan(actor, 'fleet:write');
  const contact = await updateContact(db(), { organisationId: actor.organisationId, id, input });
  if (!contact) throw new AppError('not_found:contact', 'No such contact');
  return NextResponse.json({ contact });
});

export const DELETE = route<Ctx>('contact', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(idParams, await params, 'contact');
  assertCan(actor, 'fleet:write');
  if (!(await deleteContact(db(), { organisationId: actor.organisationId, id }))) throw new AppError('not_found:contact', 'No such contact');
  return new Response(null, { status: 204 });
});
