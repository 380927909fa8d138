/**
 * Everything the report shows, gathered from the session's facts and folded log: the parties, the summary, the
 * sign-offs and the hash chain's verdict. Pure; the PDF renderer draws it, the routes build it.
 */
import type { UnitSystem } from '@/lib/leveling/units';
import type { SessionEvent, SessionScrew, Signature } from '@/lib/session/events';
import { foldEvents, type SessionState } from '@/lib/session/fold';
import { verifyChain, type ChainVerdict } from '@/lib/session/hash-chain';
import { summarizeSession, timesOf, type SessionSummary } from '@/lib/session/summary';
import type { ReportFacts } from './facts';
import { fileSafe } from './format';

export type ReportInput = {
  units: UnitSystem;
  generatedAt: Date;
  organisation: string;
  customer: string;
  site: { name: string; address: string };
  machine: { model: string; serial: string; label: string | null };
  /** The visit's scheduled day, or the day the session opened when it was opened outside a visit. */
  visitDate: string;
  /** Whether visitDate is the visit's (true) or the session's first day (false). */
  fromVisit: boolean;
  technician: string;
  experts: string[];
  state: SessionState;
  summary: SessionSummary;
  screws: SessionScrew[];
  signOff: {
    technicianFinishedAt: string | null;
    approval: { name: string; at: string; signature: Signature } | null;
    returns: number;
  };
  chain: ChainVerdict;
};

/** The report's input for a session's facts, its figures in `units`, made at `now`. */
export function reportInputOf(facts: ReportFacts, units: UnitSystem, now: Date): ReportInput {
  return reportInputOfLog(facts.events, {
    units,
    generatedAt: now,
    organisation: facts.organisation.name,
    customer: facts.customer.name,
    site: facts.site,
    machine: facts.machine,
    technician: facts.technician.name,
    visitDate: facts.visit ? facts.visit.scheduledFor.toISOString().slice(0, 10) : null,
    instruments: facts.instruments,
  });
}

/** The same from a log and the facts around it (tests and imports build it without a database). */
export function reportInputOfLog(
  events: readonly SessionEvent[],
  f: {
    units: UnitSystem;
    generatedAt: Date;
    organisation: string;
    customer: string;
    site: { name: string; address: string };
    machine: { model: string; serial: string };
    technician: string;
    visitDate: string | null;
    instruments: ReportFacts['instruments'];
  },
): ReportInput {
  const state = foldEvents(events);
  const summary = summarizeSession(state, { ...timesOf(events), instruments: f.instruments });
  const firstDay = (events[0]?.serverTs ?? f.generatedAt.toISOString()).slice(0, 10);
  const approval = state.review.approval;
  return {
    units: f.units,
    generatedAt: f.generatedAt,
    organisation: f.organisation,
    customer: f.customer,
    site: f.site,
    machine: { model: f.machine.model, serial: f.machine.serial, label: state.machineLabel },
    visitDate: f.visitDate ?? firstDay,
    fromVisit: f.visitDate !== null,
    technician: f.technician,
    experts: state.participants.filter((p) => p.part === 'expert').map((p) => p.name),
    state,
    summary,
    screws: state.screws,
    signOff: {
      technicianFinishedAt: state.ended?.at ?? null,
      approval: approval ? { name: approval.name, at: approval.at, signature: approval.signature } : null,
      returns: state.review.returns.length,
    },
    chain: verifyChain(events),
  };
}

/** The PDF's file name: the machine's serial and the visit date. */
export function reportFileName(input: Pick<ReportInput, 'machine' | 'visitDate'>): string {
  return `levelwire-report-${fileSafe(input.machine.serial)}-${input.visitDate}.pdf`;
}
