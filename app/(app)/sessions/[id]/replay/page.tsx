import type { Metadata } from 'next';
import { db } from '@/db/client';
import { listVisitInstruments } from '@/db/queries/visits';
import { ReplayView } from '@/components/replay/replay-view';
import { instrumentFact } from '@/lib/report/facts';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { currentFootprint, loadSessionForPage } from '../load';

export const metadata: Metadata = { title: 'Replay' };

/** Anyone who may read the session replays it; reviewers and admins reading it also review it here. */
export default async function ReplayPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/sessions/${id}/replay`);
  const session = await loadSessionForPage(actor, id);
  const { machine } = session;
  const instruments = session.visitId ? (await listVisitInstruments(db(), { visitId: session.visitId })).map(instrumentFact) : [];
  const fallbackScrews = currentFootprint(session);
  return (
    <ReplayView
      sessionId={session.id}
      standing={session.standing}
      selfId={actor.id}
      unitSystem={actor.unitSystem}
      machineLabel={`${machine.model} · ${machine.serial}`}
      technicianName={session.technician.name}
      fallbackScrews={fallbackScrews}
      table={{ lengthMm: machine.tableLengthMm, widthMm: machine.tableWidthMm }}
      travelMm={machine.travelYMm}
      canReview={can(actor, 'session:review') && session.standing === 'reader'}
      instruments={instruments}
    />
  );
}
