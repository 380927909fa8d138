import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { insertMachine, machineIdsBySerial, siteIdsByName, siteKey, updateMachine } from '@/db/queries/machines';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError, problem } from '@/lib/errors';
import { parseMachinesCsv } from '@/lib/fleet/machines-csv';
import { cappedText, route } from '@/lib/http';

const MAX_CSV_BYTES = 5 * 1024 * 1024;

/**
 * Imports Levelwire's machine CSV (text/csv body): a machine whose serial is on record is updated, a new one
 * created. One bad row refuses the whole file (400 listing every problem by line and column); nothing is
 * half-imported, because all writes run in one transaction after the whole file has been checked.
 */
export const POST = route('import', async (req) => {
  const actor = await requireActor();
  // The role is known without the database: refuse before reading up to 5 MB from someone who may not import.
  assertCan(actor, 'fleet:write');
  const text = await cappedText(req, MAX_CSV_BYTES, 'import');
  // PostgreSQL cannot store a NUL character, and a spreadsheet never writes one: refused before it reaches an insert.
  const nul = text.indexOf('\u0000');
  if (nul >= 0) throw new AppError('bad_request:import', `file: line ${text.slice(0, nul).split('\n').length} holds a NUL character (not a text CSV)`, 'file');
  const organisationId = actor.organisationId;
  const sites = await siteIdsByName(db(), { organisationId });
  const parsed = parseMachinesCsv(text, (customer, site) => sites.get(siteKey(customer, site)));
  if (!parsed.ok) {
    const first = parsed.problems[0]!;
    const err = new AppError('bad_request:import', `line ${first.line}, ${first.field}: ${first.message}${parsed.problems.length > 1 ? ` (and ${parsed.problems.length - 1} more)` : ''}`, first.field);
    return NextResponse.json({ ...problem(err), problems: parsed.problems }, { status: 400, headers: { 'content-type': 'application/problem+json' } });
  }
  const result = await db().transaction(async (tx) => {
    const existing = await machineIdsBySerial(tx, { organisationId, serials: parsed.machines.map((m) => m.serial) });
    let created = 0;
    let updated = 0;
    for (const { line: _line, ...input } of parsed.machines) {
      const id = existing.get(input.serial);
      if (id) {
        await updateMachine(tx, { organisationId, id, input });
        updated += 1;
      } else {
        await insertMachine(tx, { organisationId, input });
        created += 1;
      }
    }
    return { created, updated };
  });
  return NextResponse.json(result);
});
