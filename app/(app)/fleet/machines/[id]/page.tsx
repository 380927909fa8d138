import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { db } from '@/db/client';
import { listSites } from '@/db/queries/customers';
import { getMachineHistory } from '@/db/queries/history';
import { getMachine } from '@/db/queries/machines';
import { MachineForm } from '@/components/fleet/machine-form';
import { MachineHistory } from '@/components/fleet/machine-history';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { todayUtc } from '@/lib/dates';

export const metadata: Metadata = { title: 'Machine' };

export default async function MachinePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/fleet/machines/${id}`);
  if (!z.uuid().safeParse(id).success) notFound();
  const [machine, sites, history] = await Promise.all([
    getMachine(db(), { organisationId: actor.organisationId, id }),
    listSites(db(), { organisationId: actor.organisationId }),
    getMachineHistory(db(), {
      organisationId: actor.organisationId,
      machineId: id,
      viewer: { id: actor.id, readsAll: actor.role === 'reviewer' || actor.role === 'admin' },
      today: todayUtc(new Date()),
    }),
  ]);
  if (!machine || !history) notFound();
  const mayWrite = can(actor, 'fleet:write');
  const form = {
    ...machine,
    screws: machine.screws.map((s) => ({
      label: s.label,
      kind: s.kind,
      xMm: s.xMm,
      yMm: s.yMm,
      thread: s.threadTpi ? { unit: 'tpi' as const, value: s.threadTpi } : { unit: 'mm' as const, value: s.pitchMm },
      liftPerTurnMm: s.liftPerTurnMm,
      specHeightMm: s.specHeightMm,
    })),
  };
  return (
    <main className="mx-auto grid max-w-6xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <div>
        <p className="text-sm font-semibold uppercase tracking-wide text-ink-soft">
          {machine.site.customer.name} · {machine.site.name}
        </p>
        <h1 className="text-2xl font-bold">
          {machine.model} <span className="tabular text-ink-soft">{machine.serial}</span>
        </h1>
        {machine.site.floorNotes && <p className="mt-1 max-w-3xl text-ink-soft">Floor: {machine.site.floorNotes}</p>}
      </div>
      <MachineHistory
        rows={history.rows}
        series={history.series}
        due={history.due}
        checkIntervalMonths={history.machine.checkIntervalMonths}
        unitSystem={actor.unitSystem}
        mayImport={can(actor, 'session:import')}
      />
      <MachineForm unitSystem={actor.unitSystem} sites={sites} machine={form} readOnly={!mayWrite} />
    </main>
  );
}
