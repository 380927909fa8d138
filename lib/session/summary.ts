/**
 * The summary of a session's record: as-found against as-left for every measure with its tolerance and verdict,
 * screw heights, rounds, duration, instruments, photos and the moves made. Pure: reads a folded SessionState (and
 * facts the caller passes in); no clock, no I/O. The replay page, the report PDF and its e-mail all read this.
 *
 * Definitions kept in step with the machine history:
 * - as-found of a measure is the first point of `sessionSeries(s)[m]` (its first completed round);
 * - as-left is the value of the lock-as-left stage's last completed round when that round has the measure
 *   (`source: 'lock-as-left'`), otherwise the last point of the series (`source: 'last-round'`);
 * - a measure nobody took is `value: null` with the reason, never zero.
 */
import { calibrationStatus, type CalibrationStatus } from '@/lib/fleet/calibration';
import { analyzeSweep, type SweepAnalysis } from '@/lib/leveling/sweep';
import { todayUtc } from '@/lib/dates';
import { HEIGHT_TOLERANCE_MM, tolerancesOf } from './derive';
import type { SessionEvent } from './events';
import type { RecordedReading, SessionState } from './fold';
import { completedRounds, roundMeasures, sessionSeries, withinTolerance, type Round, type SeriesMeasure } from './series';
import type { SessionStage } from './stages';

/** Where an as-left value came from: the lock-as-left stage's last completed round, or the measure's last round. */
export type AsLeftSource = 'lock-as-left' | 'last-round';

/** A measured value with the round it comes from and its verdict (null: the measure has no limit, e.g. closure). */
export type Measured = { value: number; seq: number; at: string; stage: SessionStage; pass: boolean | null };
/** A measure nobody took: never zero, always the reason. */
export type NotMeasured = { value: null; reason: string };

export type SummaryMeasure = SeriesMeasure | 'sweepLeftRight' | 'sweepFrontBack' | 'sweepClosure';

export type MeasureRow = {
  measure: SummaryMeasure;
  label: string;
  /** 'urad' for slopes and slope changes, 'um' for the sweep's indicator figures. */
  unit: 'urad' | 'um';
  /** The limit in `unit`; null when the measure has none (the sweep's closure is shown, not judged). */
  tolerance: number | null;
  /** Judged on |value| (tilt, the sweep's differences) or on the value itself (twist, bow, TIR: never negative). */
  signed: boolean;
  asFound: Measured | NotMeasured;
  asLeft: (Measured & { source: AsLeftSource }) | NotMeasured;
};

/** A sweep as taken: the four readings (µm on a circle of diameterMm) and what lib/leveling analyzeSweep makes of them. */
export type SweepFigures = {
  seq: number;
  at: string;
  stage: SessionStage;
  diameterMm: number;
  frontUm: number;
  backUm: number;
  leftUm: number;
  rightUm: number;
  analysis: SweepAnalysis;
};

export type HeightFigure = { heightMm: number; seq: number; at: string; deviationMm: number | null; pass: boolean | null };

export type ScrewHeightRow = {
  screwId: string;
  label: string;
  specifiedHeightMm: number | null;
  toleranceMm: number;
  asFound: HeightFigure | NotMeasured;
  /** The last height reading of the screw (the same reading as as-found when it was read once). */
  asLeft: HeightFigure | NotMeasured;
  /** Raise done on the screw after its last height reading, µm: the height has moved by this much since. */
  raisedSinceUm: number;
};

export type ScrewMoves = {
  screwId: string;
  label: string;
  kind: 'corner' | 'middle' | 'outrigger';
  xMm: number;
  yMm: number;
  /** Moves answered done: their count, total turns and total raise, µm (positive raises the base). */
  done: number;
  turns: number;
  raiseUm: number;
  /** Moves sent to the screw and answered "can't", and still pending. */
  cannot: number;
  pending: number;
};

export type InstrumentFact = {
  kind: 'level' | 'indicator';
  model: string;
  serial: string;
  calibratedOn: string | null;
  calibrationDue: string;
  /** An admin's written reason for using it past its due date, when there was one. */
  overrideReason?: string | null;
};

export type InstrumentRow = InstrumentFact & {
  /** Calibration status on the day the session started (the record's day), per lib/fleet/calibration. */
  status: CalibrationStatus;
  /** The day the status is judged on (YYYY-MM-DD, UTC). */
  judgedOn: string;
  /**
   * The certificate on file was issued after that day (the instrument was calibrated again since): the status is
   * then unknown, since the certificate in force at the visit is not on file.
   */
  certificateLater: boolean;
};

/** A stretch of time the session was live: opened or resumed, until ended (or its last event, when still live). */
export type LiveSpan = { from: string; to: string };

export type SummaryFacts = {
  instruments?: InstrumentFact[];
  /** Time of the first and last event of the log; taken from the state when not given. */
  startedAt?: string;
  lastEventAt?: string;
  /** The live stretches (see liveSpansOf); without them, time live is known only for a session never resumed. */
  liveSpans?: LiveSpan[];
};

export type SessionSummary = {
  status: SessionState['status'];
  measures: MeasureRow[];
  /** The sweeps behind the as-found and as-left sweep rows. */
  sweep: { asFound: SweepFigures | NotMeasured; asLeft: (SweepFigures & { source: AsLeftSource }) | NotMeasured };
  heights: ScrewHeightRow[];
  /** pass: every measure with a limit has an as-left value within it; fail: one is outside; incomplete: one is missing. */
  asLeftVerdict: 'pass' | 'fail' | 'incomplete';
  rounds: { count: number; byStage: Partial<Record<SessionStage, number>> };
  duration: { startedAt: string | null; lastEventAt: string | null; totalMs: number | null; liveMs: number | null; liveReason: string | null };
  moves: { sent: number; done: number; cannot: number; pending: number; byScrew: ScrewMoves[] };
  instruments: InstrumentRow[];
  photos: { photoId: string; caption: string; stage: SessionStage; at: string; contentType: string; hasThumb: boolean }[];
};

const missing = (reason: string): NotMeasured => ({ value: null, reason });

/** The lock-as-left stage's last completed round, or null. */
export function lastAsLeftRound(s: SessionState, rounds: Round[] = completedRounds(s)): Round | null {
  let last: Round | null = null;
  for (const r of rounds) if (r.stage === 'lock-as-left') last = r;
  return last;
}

function sweepOf(round: Round): SweepFigures | null {
  const r = round.readings.find((x): x is RecordedReading & { kind: 'sweep' } => x.kind === 'sweep');
  if (!r) return null;
  return {
    seq: round.seq,
    at: round.at,
    stage: round.stage,
    diameterMm: r.diameterMm,
    frontUm: r.frontUm,
    backUm: r.backUm,
    leftUm: r.leftUm,
    rightUm: r.rightUm,
    analysis: analyzeSweep(r),
  };
}

const SWEEP_COMPONENTS = [
  { measure: 'sweepLeftRight', label: 'Sweep left–right difference (right − left)', of: (a: SweepFigures) => a.rightUm - a.leftUm, limited: true },
  { measure: 'sweepFrontBack', label: 'Sweep front–back difference (back − front)', of: (a: SweepFigures) => a.backUm - a.frontUm, limited: true },
  { measure: 'sweepClosure', label: 'Sweep closure (right + left) − (front + back)', of: (a: SweepFigures) => a.analysis.closureUm, limited: false },
] as const;

/**
 * Adjustment rounds are counted from the moves answered done, in the order they were answered: consecutive done
 * answers form one round until a reading is recorded or another stage is entered between them (the readings that
 * check a group of moves close it). Moves answered "can't" do not count. `byStage` splits the count by the stage
 * the moves were sent in.
 */
export function countRounds(s: SessionState): SessionSummary['rounds'] {
  const done = s.moves.filter((m) => m.status === 'done' && m.answeredSeq !== null).sort((a, b) => a.answeredSeq! - b.answeredSeq!);
  const breaks = [...s.readings.map((r) => r.seq), ...s.stageLog.map((x) => x.seq)].sort((a, b) => a - b);
  const byStage: Partial<Record<SessionStage, number>> = {};
  let count = 0;
  let prev: (typeof done)[number] | null = null;
  for (const m of done) {
    const split = !prev || prev.stage !== m.stage || breaks.some((b) => b > prev!.answeredSeq! && b < m.answeredSeq!);
    if (split) {
      count += 1;
      byStage[m.stage] = (byStage[m.stage] ?? 0) + 1;
    }
    prev = m;
  }
  return { count, byStage };
}

/** The live stretches of a log: from the opening (or a resume) to the next end, or to the last event while live. */
export function liveSpansOf(events: readonly SessionEvent[]): LiveSpan[] {
  const spans: LiveSpan[] = [];
  let from: string | null = null;
  for (const e of events) {
    if (e.type === 'session:opened' || e.type === 'session:resumed') from ??= e.serverTs;
    else if (e.type === 'session:ended' && from !== null) {
      spans.push({ from, to: e.serverTs });
      from = null;
    }
  }
  const last = events[events.length - 1];
  if (from !== null && last) spans.push({ from, to: last.serverTs });
  return spans;
}

/** First and last event times and the live stretches of a log, as SummaryFacts. */
export function timesOf(events: readonly SessionEvent[]): Pick<SummaryFacts, 'startedAt' | 'lastEventAt' | 'liveSpans'> {
  return { startedAt: events[0]?.serverTs, lastEventAt: events[events.length - 1]?.serverTs, liveSpans: liveSpansOf(events) };
}

/** The latest time the state itself knows of (without the log: readings, moves, notes, photos, the end, the review). */
function lastTimeInState(s: SessionState): string | null {
  const times = [
    ...s.stageLog.map((x) => x.at),
    ...s.readings.map((r) => r.serverTs),
    ...s.moves.flatMap((m) => [m.sentAt, ...(m.answeredAt ? [m.answeredAt] : [])]),
    ...s.notes.map((n) => n.at),
    ...s.photos.map((p) => p.at),
    ...(s.ended ? [s.ended.at] : []),
    ...s.review.comments.map((c) => c.at),
    ...s.review.returns.map((r) => r.at),
    ...s.review.resumes.map((r) => r.at),
    ...(s.review.approval ? [s.review.approval.at] : []),
  ];
  return times.length === 0 ? null : times.reduce((a, b) => (Date.parse(b) > Date.parse(a) ? b : a));
}

const ms = (from: string, to: string) => Date.parse(to) - Date.parse(from);

function durationOf(s: SessionState, facts: SummaryFacts): SessionSummary['duration'] {
  const startedAt = facts.startedAt ?? s.stageLog[0]?.at ?? null;
  const lastEventAt = facts.lastEventAt ?? lastTimeInState(s);
  const totalMs = startedAt && lastEventAt ? ms(startedAt, lastEventAt) : null;
  if (facts.liveSpans) return { startedAt, lastEventAt, totalMs, liveMs: facts.liveSpans.reduce((t, x) => t + ms(x.from, x.to), 0), liveReason: null };
  if (!startedAt) return { startedAt, lastEventAt, totalMs, liveMs: null, liveReason: 'the session has no opening event' };
  if (s.review.resumes.length > 0) return { startedAt, lastEventAt, totalMs, liveMs: null, liveReason: 'the session was resumed: time live needs its log' };
  const liveEnd = s.ended?.at ?? lastEventAt;
  return { startedAt, lastEventAt, totalMs, liveMs: liveEnd ? ms(startedAt, liveEnd) : null, liveReason: null };
}

function heightRows(s: SessionState): ScrewHeightRow[] {
  return s.screws.map((sc) => {
    const readings = s.readings.filter((r): r is RecordedReading & { kind: 'height' } => r.kind === 'height' && r.screwId === sc.id);
    const figure = (r: (typeof readings)[number]): HeightFigure => {
      const deviationMm = sc.specifiedHeightMm === null ? null : r.heightMm - sc.specifiedHeightMm;
      return { heightMm: r.heightMm, seq: r.seq, at: r.serverTs, deviationMm, pass: deviationMm === null ? null : Math.abs(deviationMm) <= HEIGHT_TOLERANCE_MM };
    };
    const first = readings[0];
    const last = readings[readings.length - 1];
    const raisedSinceUm = last
      ? s.moves.filter((m) => m.screwId === sc.id && m.status === 'done' && (m.answeredSeq ?? 0) > last.seq).reduce((t, m) => t + (m.doneRaiseUm ?? 0), 0)
      : 0;
    return {
      screwId: sc.id,
      label: sc.label,
      specifiedHeightMm: sc.specifiedHeightMm,
      toleranceMm: HEIGHT_TOLERANCE_MM,
      asFound: first ? figure(first) : missing('no height read at this screw'),
      asLeft: last ? figure(last) : missing('no height read at this screw'),
      raisedSinceUm,
    };
  });
}

function movesOf(s: SessionState): SessionSummary['moves'] {
  const byScrew = s.screws.map((sc): ScrewMoves => {
    const mine = s.moves.filter((m) => m.screwId === sc.id);
    const done = mine.filter((m) => m.status === 'done');
    return {
      screwId: sc.id,
      label: sc.label,
      kind: sc.kind,
      xMm: sc.xMm,
      yMm: sc.yMm,
      done: done.length,
      turns: done.reduce((t, m) => t + (m.doneTurns ?? 0), 0),
      raiseUm: done.reduce((t, m) => t + (m.doneRaiseUm ?? 0), 0),
      cannot: mine.filter((m) => m.status === 'cannot').length,
      pending: mine.filter((m) => m.status === 'pending').length,
    };
  });
  const count = (status: 'done' | 'cannot' | 'pending') => s.moves.filter((m) => m.status === status).length;
  return { sent: s.moves.length, done: count('done'), cannot: count('cannot'), pending: count('pending'), byScrew };
}

function instrumentRows(facts: SummaryFacts, startedAt: string | null): InstrumentRow[] {
  const judgedOn = startedAt ? todayUtc(new Date(startedAt)) : null;
  return (facts.instruments ?? []).map((i) => {
    const on = judgedOn ?? i.calibrationDue;
    return { ...i, status: calibrationStatus(i.calibrationDue, on), judgedOn: on, certificateLater: i.calibratedOn !== null && i.calibratedOn > on };
  });
}

/** The summary of a session (see the file's comment for as-found and as-left). */
export function summarizeSession(s: SessionState, facts: SummaryFacts = {}): SessionSummary {
  const rounds = completedRounds(s);
  const series = sessionSeries(s);
  const asLeftRound = lastAsLeftRound(s, rounds);
  const asLeftValues = asLeftRound ? roundMeasures(asLeftRound) : {};

  const measures: MeasureRow[] = (['tiltX', 'tiltY', 'twist', 'bow', 'sweepTir'] as const).map((m) => {
    const sr = series[m];
    const first = sr.points[0];
    const last = sr.points[sr.points.length - 1];
    const judge = (value: number) => withinTolerance(sr, value);
    const fromLock = asLeftValues[m];
    const none = `no completed round measured ${sr.label.toLowerCase()}`;
    return {
      measure: m,
      label: sr.label,
      unit: sr.unit,
      tolerance: sr.tolerance,
      signed: sr.signed,
      asFound: first ? { value: first.value, seq: first.seq, at: first.at, stage: first.stage, pass: judge(first.value) } : missing(none),
      asLeft:
        fromLock !== undefined && asLeftRound
          ? { value: fromLock, seq: asLeftRound.seq, at: asLeftRound.at, stage: 'lock-as-left', pass: judge(fromLock), source: 'lock-as-left' }
          : last
            ? { value: last.value, seq: last.seq, at: last.at, stage: last.stage, pass: judge(last.value), source: 'last-round' }
            : missing(none),
    };
  });

  // The sweep's figures: as-found from the first round with a sweep (the first point of the TIR series), as-left as above.
  const sweepRounds = rounds.filter((r) => r.readings.some((x) => x.kind === 'sweep'));
  const firstSweep = sweepRounds[0] ? sweepOf(sweepRounds[0]) : null;
  const lockSweep = asLeftRound ? sweepOf(asLeftRound) : null;
  const lastSweep = sweepRounds.length > 0 ? sweepOf(sweepRounds[sweepRounds.length - 1]!) : null;
  const noSweep = 'no completed round took a spindle sweep';
  const sweep: SessionSummary['sweep'] = {
    asFound: firstSweep ?? missing(noSweep),
    asLeft: lockSweep ? { ...lockSweep, source: 'lock-as-left' } : lastSweep ? { ...lastSweep, source: 'last-round' } : missing(noSweep),
  };
  const limitUm = tolerancesOf(s).sweepTirUm;
  for (const c of SWEEP_COMPONENTS) {
    const side = (f: SweepFigures | NotMeasured): Measured | NotMeasured => {
      if (!('analysis' in f)) return f;
      const value = c.of(f);
      return { value, seq: f.seq, at: f.at, stage: f.stage, pass: c.limited ? Math.abs(value) <= limitUm : null };
    };
    const asLeft = side(sweep.asLeft);
    measures.push({
      measure: c.measure,
      label: c.label,
      unit: 'um',
      tolerance: c.limited ? limitUm : null,
      signed: true,
      asFound: side(sweep.asFound),
      asLeft: asLeft.value === null ? asLeft : { ...asLeft, source: (sweep.asLeft as { source: AsLeftSource }).source },
    });
  }

  const judged = measures.filter((m) => m.tolerance !== null);
  const asLeftVerdict = judged.some((m) => m.asLeft.value === null)
    ? 'incomplete'
    : judged.every((m) => m.asLeft.value !== null && m.asLeft.pass)
      ? 'pass'
      : 'fail';

  const duration = durationOf(s, facts);
  return {
    status: s.status,
    measures,
    sweep,
    heights: heightRows(s),
    asLeftVerdict,
    rounds: countRounds(s),
    duration,
    moves: movesOf(s),
    instruments: instrumentRows(facts, duration.startedAt),
    photos: s.photos.map((p) => ({ photoId: p.photoId, caption: p.caption, stage: p.stage, at: p.at, contentType: p.contentType, hasThumb: p.thumbKey !== null })),
  };
}
