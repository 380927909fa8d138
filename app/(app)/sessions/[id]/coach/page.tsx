import type { Metadata } from 'next';
import { CoachView } from '@/components/coach/coach-view';
import { requirePageActor } from '@/lib/auth/session';
import { loadSessionForPage } from '../load';

export const metadata: Metadata = { title: 'Coach view' };

export default async function CoachPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/sessions/${id}/coach`);
  const session = await loadSessionForPage(actor, id);
  const screws = session.machine.screws.map(({ id: screwId, label, xMm, yMm }) => ({ id: screwId, label, xMm, yMm }));
  return (
    <CoachView
      sessionId={session.id}
      screws={screws}
      unitSystem={actor.unitSystem}
      machineLabel={session.machine.model}
      technicianName={session.technician.name}
    />
  );
}
