import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { runReminders } from '@/lib/fleet/reminders';
import { route } from '@/lib/http';

/** Runs the reminder job now for the caller's organisation (the timer in server.ts runs it for all). */
export const POST = route('reminder', async () => {
  const actor = await requireActor();
  assertCan(actor, 'visit:write');
  const sent = await runReminders(db(), new Date(), { organisationId: actor.organisationId });
  return NextResponse.json(sent);
});
