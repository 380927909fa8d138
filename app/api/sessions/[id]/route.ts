import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { parseWith, route } from '@/lib/http';
import { loadSessionFor } from '@/lib/session/service';
import { sessionParams } from './schema';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>('session', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'session');
  const session = await loadSessionFor(db(), actor, id);
  const { machine } = session;
  return NextResponse.json({
    session: { id: session.id, state: session.state, levelDivisionUrad: session.levelDivisionUrad, lastSeq: session.lastSeq, technician: session.technician },
    machine: {
      id: machine.id,
      model: machine.model,
      serial: machine.serial,
      tableLengthMm: machine.tableLengthMm,
      tableWidthMm: machine.tableWidthMm,
      screws: machine.screws.map(({ id, label, kind, xMm, yMm, pitchMm }) => ({ id, label, kind, xMm, yMm, pitchMm })),
    },
  });
});
