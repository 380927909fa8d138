import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { findMachineBySerial, getMachine, siteBelongs, updateMachine } from '@/db/queries/machines';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { jsonBody, parseWith, route } from '@/lib/http';
import { machineParams, machinePatch } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>('machine', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(machineParams, await params, 'machine');
  assertCan(actor, 'fleet:read');
  const machine = await getMachine(db(), { organisationId: actor.organisationId, id });
  if (!machine) throw new AppError('not_found:machine', 'No such machine');
  return NextResponse.json({ machine });
});

/** Changes a machine; a footprint given replaces the old one (screws keep their ids by label). */
export const PATCH = route<Ctx>('machine', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(machineParams, await params, 'machine');
  const input = parseWith(machinePatch, await jsonBody(req, 'machine'), 'machine');
  assertCan(actor, 'fleet:write');
  const organisationId = actor.organisationId;
  if (!(await getMachine(db(), { organisationId, id }))) throw new AppError('not_found:machine', 'No such machine');
  if (input.siteId && !(await siteBelongs(db(), { organisationId, siteId: input.siteId }))) {
    throw new AppError('bad_request:machine', 'siteId: no such site', 'siteId');
  }
  if (input.serial) {
    const other = await findMachineBySerial(db(), { organisationId, serial: input.serial });
    if (other && other.id !== id) throw new AppError('conflict:machine', `serial: a machine with serial ${input.serial} is already on record`, 'serial');
  }
  await updateMachine(db(), { organisationId, id, input });
  return NextResponse.json({ machine: await getMachine(db(), { organisationId, id }) });
});
