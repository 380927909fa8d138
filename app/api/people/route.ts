import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { listActivePeople } from '@/db/queries/users';
import { requireActor } from '@/lib/auth/session';
import { parseWith, route } from '@/lib/http';
import { peopleQuery } from './schema';

/** Active people of the caller's organisation (id, name, role) for pickers; any signed-in user. */
export const GET = route('people', async (req) => {
  const actor = await requireActor();
  const { role } = parseWith(peopleQuery, Object.fromEntries(new URL(req.url).searchParams), 'people');
  const people = await listActivePeople(db(), { organisationId: actor.organisationId, role });
  return NextResponse.json({ people });
});
