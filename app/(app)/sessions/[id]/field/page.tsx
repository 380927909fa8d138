import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { FieldView } from '@/components/field/field-view';
import { requirePageActor } from '@/lib/auth/session';
import { loadSessionForPage } from '../load';

export const metadata: Metadata = { title: 'Field view' };

/** The technician's screen; everyone else taking part (or reading) is sent to the coach view. */
export default async function FieldPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/sessions/${id}/field`);
  const session = await loadSessionForPage(actor, id);
  if (session.standing !== 'technician') redirect(`/sessions/${id}/coach`);
  const { tableLengthMm, tableWidthMm, model } = session.machine;
  return (
    <FieldView
      sessionId={session.id}
      userId={actor.id}
      unitSystem={actor.unitSystem}
      machineLabel={model}
      tableMm={tableLengthMm && tableWidthMm ? { lengthMm: tableLengthMm, widthMm: tableWidthMm } : null}
    />
  );
}
