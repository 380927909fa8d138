import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getMachineHistory } from '@/db/queries/history';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { todayUtc } from '@/lib/dates';
import { AppError } from '@/lib/errors';
import { parseWith, route } from '@/lib/http';
import { machineParams } from '../../schema';

type Ctx = { params: Promise<{ id: string }> };

/**
 * The machine's history: the as-found and as-left of every ended session (per measure, oldest first), each session's
 * state, and the next due date. Anyone who reads the fleet may ask; a session's replay is theirs to open only where
 * `mayOpen` says so. 404 for another organisation's machine.
 */
export const GET = route<Ctx>('machine', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(machineParams, await params, 'machine');
  assertCan(actor, 'fleet:read');
  const history = await getMachineHistory(db(), {
    organisationId: actor.organisationId,
    machineId: id,
    viewer: { id: actor.id, readsAll: actor.role === 'reviewer' || actor.role === 'admin' },
    today: todayUtc(new Date()),
  });
  if (!history) throw new AppError('not_found:machine', 'No such machine');
  return NextResponse.json(history);
});
