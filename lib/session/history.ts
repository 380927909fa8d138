/**
 * A machine's history across visits: the as-found and as-left of every ended session, per measure, so settling of
 * the floor or foundation shows as a trend, and the machine's next due date. Pure: folded sessions in, rows and
 * series out; `today` is passed in.
 *
 * As-found of a measure = the first point of `sessionSeries(state)[m]` (the first completed round that gives it);
 * as-left = the value of the last completed lock-and-as-left round when it has the measure, else the last point: the
 * same rule as the session's summary (lib/session/summary.ts). A session whose rounds never gave a measure has neither.
 */
import { dueStatus, lastLeveledOn, nextDueOn, type DueStatus } from '@/lib/fleet/due';
import { initialState, type SessionState, type SessionStatus } from './fold';
import { completedRounds, roundMeasures, SERIES_MEASURES, sessionSeries, withinTolerance, type Series, type SeriesMeasure, type SeriesPoint } from './series';
import { lastAsLeftRound } from './summary';

/** The states after live that the history shows (a session resumed for rework is live again and drops out until it ends). */
export const HISTORY_STATUSES = ['ended', 'in_review', 'returned', 'approved'] as const satisfies readonly SessionStatus[];

/** One measure of one session: its first and last value, each with whether it was within the session's tolerance. */
export type MeasureEnds = {
  asFound: (SeriesPoint & { within: boolean }) | null;
  asLeft: (SeriesPoint & { within: boolean }) | null;
  /** The session's own tolerance for the measure (µrad, or µm for the sweep TIR). */
  tolerance: number;
};

/** As-found and as-left of every measure of one folded session. */
export function asFoundAsLeft(state: SessionState): Record<SeriesMeasure, MeasureEnds> {
  const series = sessionSeries(state);
  const lock = lastAsLeftRound(state, completedRounds(state));
  const lockValues = lock ? roundMeasures(lock) : {};
  const ends = (s: Series): MeasureEnds => {
    const first = s.points[0];
    const fromLock = lockValues[s.measure];
    const last = lock && fromLock !== undefined ? { seq: lock.seq, at: lock.at, value: fromLock, stage: lock.stage } : s.points.at(-1);
    return {
      asFound: first ? { ...first, within: withinTolerance(s, first.value) } : null,
      asLeft: last ? { ...last, within: withinTolerance(s, last.value) } : null,
      tolerance: s.tolerance,
    };
  };
  return Object.fromEntries(SERIES_MEASURES.map((m) => [m, ends(series[m])])) as Record<SeriesMeasure, MeasureEnds>;
}

/** A session as the history takes it: its folded log and what its row says. */
export type HistorySessionInput = {
  id: string;
  state: SessionState;
  /** ISO time of the approval (the row's approved_at), or null. */
  approvedAt: string | null;
  technicianName: string | null;
  /** The viewer may open the session (a participant, or a reviewer or admin): its replay and export are linked. */
  mayOpen: boolean;
};

export type HistoryRow = {
  sessionId: string;
  /** When the session opened (its first event), ISO. */
  openedAt: string | null;
  /** When it last ended, ISO. */
  endedAt: string | null;
  status: SessionStatus;
  approvedAt: string | null;
  technicianName: string | null;
  mayOpen: boolean;
  measures: Record<SeriesMeasure, MeasureEnds>;
};

/** One session's value of a measure on the history chart. */
export type HistoryPoint = { sessionId: string; seq: number; at: string; value: number; within: boolean; approved: boolean; mayOpen: boolean };

export type HistorySeries = Pick<Series, 'measure' | 'label' | 'unit' | 'signed'> & {
  /** The latest session's tolerance: the band the chart draws (each point's colour uses its own session's). */
  tolerance: number;
  asFound: HistoryPoint[];
  asLeft: HistoryPoint[];
};

export type MachineDue = {
  /** The later of the last approved session's UTC day and the leveling on record from before Levelwire. */
  lastLeveledOn: string | null;
  /** Null: never leveled, so due now. */
  nextDueOn: string | null;
  status: DueStatus;
};

export type MachineHistory = { rows: HistoryRow[]; series: Record<SeriesMeasure, HistorySeries>; due: MachineDue };

const byTime = (a: { at: string; sessionId: string }, b: { at: string; sessionId: string }) => a.at.localeCompare(b.at) || a.sessionId.localeCompare(b.sessionId);

/**
 * The history of one machine from its sessions (any order in; only ended, in review, returned or approved ones are
 * kept), oldest first, and its due date with issue 4's rule (lib/fleet/due.ts, as the due list computes it).
 */
export function machineHistory(
  sessions: readonly HistorySessionInput[],
  machine: { checkIntervalMonths: number; priorLeveledOn: string | null },
  { today, soonDays }: { today: string; soonDays: number },
): MachineHistory {
  const kept = sessions.filter((s) => (HISTORY_STATUSES as readonly SessionStatus[]).includes(s.state.status));
  const rows: HistoryRow[] = kept
    .map((s) => ({
      sessionId: s.id,
      openedAt: s.state.stageLog[0]?.at ?? null,
      endedAt: s.state.ended?.at ?? null,
      status: s.state.status,
      approvedAt: s.approvedAt,
      technicianName: s.technicianName,
      mayOpen: s.mayOpen,
      measures: asFoundAsLeft(s.state),
    }))
    .sort((a, b) => byTime({ at: a.openedAt ?? '', sessionId: a.sessionId }, { at: b.openedAt ?? '', sessionId: b.sessionId }));

  const template = sessionSeries(kept.at(-1)?.state ?? initialState);
  const latest = rows.at(-1);
  const series = Object.fromEntries(
    SERIES_MEASURES.map((m) => {
      const t = template[m];
      const point = (row: HistoryRow, end: 'asFound' | 'asLeft'): HistoryPoint[] => {
        const p = row.measures[m][end];
        return p ? [{ sessionId: row.sessionId, seq: p.seq, at: p.at, value: p.value, within: p.within, approved: row.status === 'approved', mayOpen: row.mayOpen }] : [];
      };
      const out: HistorySeries = {
        measure: m,
        label: t.label,
        unit: t.unit,
        signed: t.signed,
        tolerance: latest ? latest.measures[m].tolerance : t.tolerance,
        asFound: rows.flatMap((r) => point(r, 'asFound')).sort(byTime),
        asLeft: rows.flatMap((r) => point(r, 'asLeft')).sort(byTime),
      };
      return [m, out];
    }),
  ) as Record<SeriesMeasure, HistorySeries>;

  // The due list counts the UTC day of each approval (lib/fleet/due.ts, db/queries/due.ts).
  const approvedDays = sessions.flatMap((s) => (s.approvedAt ? [s.approvedAt.slice(0, 10)] : [])).sort();
  const last = lastLeveledOn(approvedDays.at(-1) ?? null, machine.priorLeveledOn);
  const next = last ? nextDueOn(last, machine.checkIntervalMonths) : null;
  return { rows, series, due: { lastLeveledOn: last, nextDueOn: next, status: dueStatus(next, today, soonDays) } };
}

