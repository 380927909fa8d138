import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { listUsersByOrganisation } from '@/db/queries/users';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { route } from '@/lib/http';

export const GET = route('user', async () => {
  const actor = await requireActor();
  assertCan(actor, 'user:manage');
  const users = await listUsersByOrganisation(db(), { organisationId: actor.organisationId });
  return NextResponse.json({ users });
});
