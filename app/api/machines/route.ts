import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { listMachinesByOrganisation } from '@/db/queries/machines';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { route } from '@/lib/http';

export const GET = route('machine', async () => {
  const actor = await requireActor();
  assertCan(actor, 'fleet:read');
  const machines = await listMachinesByOrganisation(db(), { organisationId: actor.organisationId });
  return NextResponse.json({ machines });
});
