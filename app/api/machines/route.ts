import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { findMachineBySerial, insertMachine, listMachines, siteBelongs } from '@/db/queries/machines';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { jsonBody, parseWith, route } from '@/lib/http';
import { searchParamsOf } from '@/lib/list-query';
import { machineInput, machineListQuery } from './schema';

/** The organisation's machines, one page at a time; sorted, filtered and counted in the database. */
export const GET = route('machine', async (req) => {
  const actor = await requireActor();
  const query = parseWith(machineListQuery, searchParamsOf(req), 'machine');
  assertCan(actor, 'fleet:read');
  return NextResponse.json(await listMachines(db(), { organisationId: actor.organisationId, ...query }));
});

export const POST = route('machine', async (req) => {
  const actor = await requireActor();
  const input = parseWith(machineInput, await jsonBody(req, 'machine'), 'machine');
  assertCan(actor, 'fleet:write');
  if (!(await siteBelongs(db(), { organisationId: actor.organisationId, siteId: input.siteId }))) {
    throw new AppError('bad_request:machine', 'siteId: no such site', 'siteId');
  }
  if (await findMachineBySerial(db(), { organisationId: actor.organisationId, serial: input.serial })) {
    throw new AppError('conflict:machine', `serial: a machine with serial ${input.serial} is already on record`, 'serial');
  }
  const machine = await insertMachine(db(), { organisationId: actor.organisationId, input });
  return NextResponse.json({ machine: { id: machine.id } }, { status: 201 });
});
