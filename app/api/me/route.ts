import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { setUnitSystem } from '@/db/queries/preferences';
import { requireActor } from '@/lib/auth/session';
import { unitPreference } from '@/lib/settings';
import { jsonBody, parseWith, route } from '@/lib/http';

/** The signed-in user's own record. */
export const GET = route('me', async () => {
  const actor = await requireActor();
  return NextResponse.json({ me: actor });
});

/** The signed-in user's unit preference (inch or metric), used wherever values are shown or entered. */
export const PATCH = route('me', async (req) => {
  const actor = await requireActor();
  const input = parseWith(unitPreference, await jsonBody(req, 'me'), 'me');
  await setUnitSystem(db(), { userId: actor.id, ...input });
  return NextResponse.json({ me: { ...actor, ...input } });
});
