import { db } from '@/db/client';
import { listMachinesForExport } from '@/db/queries/machines';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { machinesToCsv } from '@/lib/fleet/machines-csv';
import { route } from '@/lib/http';

/** Every machine of the organisation with its footprint, as Levelwire's machine CSV (one row per screw). */
export const GET = route('machine', async () => {
  const actor = await requireActor();
  assertCan(actor, 'fleet:read');
  const rows = await listMachinesForExport(db(), { organisationId: actor.organisationId });
  const csv = machinesToCsv(
    rows.map(({ machine: m, screw: s, siteName, customerName }) => ({
      ...m,
      customer: customerName,
      site: siteName,
      screw: { label: s.label, kind: s.kind, xMm: s.xMm, yMm: s.yMm, pitchMm: s.pitchMm, threadTpi: s.threadTpi, liftPerTurnMm: s.liftPerTurnMm, specHeightMm: s.specHeightMm },
    })),
  );
  return new Response(csv, {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="levelwire-machines-${new Date().toISOString().slice(0, 10)}.csv"`,
      'cache-control': 'private, no-store',
    },
  });
});
