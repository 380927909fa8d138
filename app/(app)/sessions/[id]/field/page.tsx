import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { FieldView } from '@/components/field/field-view';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { loadSessionForPage } from '../load';

export const metadata: Metadata = { title: 'Field view' };

export default async function FieldPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/sessions/${id}/field`);
  const session = await loadSessionForPage(actor, id);
  if (!can(actor, 'reading:submit') || session.technicianId !== actor.id) redirect(`/sessions/${id}/coach`);
  return <FieldView sessionId={session.id} travelYMm={session.machine.travelYMm} unitSystem={actor.unitSystem} machineLabel={session.machine.model} />;
}
