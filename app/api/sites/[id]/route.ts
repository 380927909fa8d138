import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getSite, updateSite } from '@/db/queries/customers';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { jsonBody, parseWith, route } from '@/lib/http';
import { idParams, sitePatch } from '../../customers/schema';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>('site', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(idParams, await params, 'site');
  assertCan(actor, 'fleet:read');
  const site = await getSite(db(), { organisationId: actor.organisationId, id });
  if (!site) throw new AppError('not_found:site', 'No such site');
  return NextResponse.json({ site });
});

export const PATCH = route<Ctx>('site', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(idParams, await params, 'site');
  const input = parseWith(sitePatch, await jsonBody(req, 'site'), 'site');
  assertCan(actor, 'fleet:write');
  const site = await updateSite(db(), { organisationId: actor.organisationId, id, input });
  if (!site) throw new AppError('not_found:site', 'No such site');
  return NextResponse.json({ site });
});
