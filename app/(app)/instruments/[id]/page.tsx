import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { db } from '@/db/client';
import { getInstrumentForOrganisation, toInstrumentView } from '@/db/queries/instruments';
import { CalibrationChip } from '@/components/instruments/calibration-chip';
import { CertificatePanel } from '@/components/instruments/certificate-panel';
import { describeIndicator, describeSensitivity } from '@/components/instruments/format';
import { InstrumentForm } from '@/components/instruments/instrument-form';
import { RetireButton } from '@/components/instruments/retire-button';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { todayUtc } from '@/lib/dates';

export const metadata: Metadata = { title: 'Instrument' };
export const dynamic = 'force-dynamic';

export default async function InstrumentPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/instruments/${id}`);
  if (!z.uuid().safeParse(id).success) notFound();
  const row = await getInstrumentForOrganisation(db(), { instrumentId: id, organisationId: actor.organisationId });
  if (!row) notFound();
  const today = todayUtc();
  const instrument = toInstrumentView(row, today);
  const mayWrite = can(actor, 'instrument:write');

  return (
    <main className="mx-auto grid max-w-4xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <Link href="/instruments" className="min-h-12 content-center font-semibold text-spirit underline underline-offset-4">
        ← All instruments
      </Link>
      <section aria-labelledby="instrument-h" className="grid gap-3 rounded-xl border-2 border-rule bg-card p-4 sm:p-6">
        <p className="text-sm font-bold uppercase tracking-wide text-ink-soft">{instrument.kind === 'level' ? 'Precision level' : 'Indicator'}</p>
        <h1 id="instrument-h" className="text-2xl font-bold">
          {instrument.model}
        </h1>
        <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
          <dt className="font-semibold">Serial</dt>
          <dd className="tabular">{instrument.serial}</dd>
          <dt className="font-semibold">{instrument.kind === 'level' ? 'Sensitivity' : 'Indicator'}</dt>
          <dd data-testid="instrument-reading">
            {instrument.kind === 'level' ? describeSensitivity(instrument, actor.unitSystem) : describeIndicator(instrument, actor.unitSystem)}
            {instrument.kind === 'level' && instrument.vialCount ? ` · ${instrument.vialCount} vials` : ''}
          </dd>
          <dt className="font-semibold">Calibrated on</dt>
          <dd className="tabular">{instrument.calibratedOn ?? 'not recorded'}</dd>
          <dt className="font-semibold">Calibration due</dt>
          <dd className="flex flex-wrap items-center gap-3">
            <span className="tabular">{instrument.calibrationDue}</span>
            {instrument.active ? <CalibrationChip status={instrument.status} dueOn={instrument.calibrationDue} today={today} /> : <span className="font-bold text-ink-soft">Retired</span>}
          </dd>
        </dl>
      </section>
      <CertificatePanel instrument={instrument} mayUpload={mayWrite} />
      {mayWrite && (
        <>
          <InstrumentForm key={`${instrument.id}-${instrument.calibrationDue}-${instrument.model}`} instrument={instrument} unitSystem={actor.unitSystem} />
          <RetireButton instrumentId={instrument.id} active={instrument.active} />
        </>
      )}
    </main>
  );
}
