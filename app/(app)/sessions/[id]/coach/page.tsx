import type { Metadata } from 'next';
import { CoachView } from '@/components/coach/coach-view';
import { requirePageActor } from '@/lib/auth/session';
import { currentFootprint, loadSessionForPage } from '../load';

export const metadata: Metadata = { title: 'Coach view' };

export default async function CoachPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/sessions/${id}/coach`);
  const session = await loadSessionForPage(actor, id);
  const { machine } = session;
  const fallbackScrews = currentFootprint(session);
  return (
    <CoachView
      sessionId={session.id}
      standing={session.standing}
      selfId={actor.id}
      unitSystem={actor.unitSystem}
      machineLabel={`${machine.model} · ${machine.serial}`}
      technicianName={session.technician.name}
      fallbackScrews={fallbackScrews}
      table={{ lengthMm: machine.tableLengthMm, widthMm: machine.tableWidthMm }}
      travelMm={machine.travelYMm}
      mayAddPeople={actor.role === 'admin'}
    />
  );
}
