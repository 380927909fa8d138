'use client';

import Link from 'next/link';
import { useCallback, useDeferredValue, useEffect, useMemo, useRef } from 'react';
import { formatSlope, type UnitSystem } from '@/lib/leveling/units';
import { baseModelOf, learnedResponse } from '@/lib/session/advice';
import { stageVerdict, tolerancesOf } from '@/lib/session/derive';
import type { SessionScrew } from '@/lib/session/events';
import type { SessionState } from '@/lib/session/fold';
import { countThrough, stageMarkers, stateAt, type ReplayIndex } from '@/lib/session/replay';
import { sessionSeries } from '@/lib/session/series';
import { timesOf, type InstrumentFact } from '@/lib/session/summary';
import { BaseNumbers } from '@/components/coach/base-numbers';
import type { Standing } from '@/components/coach/format';
import { LiveChart } from '@/components/coach/live-chart';
import { MovesList } from '@/components/coach/moves-list';
import { NotesPanel } from '@/components/coach/notes-panel';
import { PhotosPanel } from '@/components/coach/photos-panel';
import { ReadingFeed } from '@/components/coach/reading-feed';
import { StagePanel } from '@/components/coach/stage-panel';
import { sceneOf } from '@/components/coach/scene';
import { TiltPanel } from '@/components/coach/tilt-panel';
import { ReportActions } from '@/components/report/report-actions';
import { SummaryPanel } from '@/components/report/summary-panel';
import { ReviewPanel } from '@/components/review/review-panel';
import { ExportLinks } from '@/components/session/export-links';
import { StatusChip } from '@/components/review/record-status';
import { elapsed, lastSeqOf, MAX_GAP_MS, realOffsetOf, timelineOf } from './player-clock';
import { Timeline, type Pin, type RecordMark } from './timeline';
import { usePlayer } from './use-player';
import { useReplayLog } from './use-replay-log';

type Props = {
  sessionId: string;
  standing: Standing;
  selfId: string;
  unitSystem: UnitSystem;
  machineLabel: string;
  technicianName: string;
  /** The machine's footprint now, for sessions whose log does not carry one. */
  fallbackScrews: SessionScrew[];
  table: { lengthMm: number; widthMm: number };
  travelMm: number;
  /** A reviewer or admin reading the session: comments, returns and approves. */
  canReview: boolean;
  /** The visit's instruments with their calibration dates, for the summary. */
  instruments: InstrumentFact[];
};

/** The engine can refuse a model it cannot fit; the replay then shows none rather than failing. */
function safely<T>(f: () => T, fallback: T): T {
  try {
    return f();
  } catch {
    return fallback;
  }
}

/** The figures of a moment that take time to work out (the engine's base model, the chart series). */
type Figures = { model: ReturnType<typeof baseModelOf>; series: ReturnType<typeof sessionSeries> };

const KEPT = 48;
/** The newest moves listed at a moment (the list is drawn again at every seek). */
const MOVES_SHOWN = 40;

/** The figures depend only on the readings and the moves' answers: moments with the same ones share them. */
const figuresKey = (s: SessionState) => `${s.readings.length}:${s.moves.length}:${s.moves.reduce((n, m) => n + (m.status === 'pending' ? 0 : 1), 0)}`;

function figuresOf(state: SessionState): Figures {
  const response = safely(() => learnedResponse(state), null);
  return { model: safely(() => baseModelOf(state, response), null), series: sessionSeries(state) };
}

/** A small first-in first-out cache, emptied when the log (its index) changes. */
function useKept<K, V>(owner: unknown) {
  const kept = useRef({ owner, map: new Map<K, V>() });
  if (kept.current.owner !== owner) kept.current = { owner, map: new Map() };
  return useCallback((key: K, make: () => V): V => {
    const map = kept.current.map;
    const hit = map.get(key);
    if (hit !== undefined) return hit;
    const value = make();
    map.set(key, value);
    if (map.size > KEPT) map.delete(map.keys().next().value!);
    return value;
  }, []);
}

/** Marks of the record itself along the timeline: each end, return, rework taken up, and the approval. */
function recordMarks(index: ReplayIndex): RecordMark[] {
  const kinds: Record<string, RecordMark['kind']> = { 'session:ended': 'ended', 'review:returned': 'returned', 'session:resumed': 'resumed', 'review:approved': 'approved' };
  return index.events.flatMap((e) => (kinds[e.type] ? [{ seq: e.seq, kind: kinds[e.type]! }] : []));
}

/** Notes drawn at a moment (the newest): a long session's chat would otherwise be drawn again on most seeks. */
const NOTES_SHOWN = 60;

/** Rows of the reading feed drawn at a moment (the newest). */
const FEED_ROWS = 50;

const ROLE_WORDS: Record<string, string> = { reviewer: 'A reviewer', admin: 'An admin', technician: 'The technician', expert: 'An expert' };

/**
 * The replay: the session as it was at the playhead (tilt view, base model, charts, readings, photos, the stage and its
 * verdict, moves with their status then, notes), a timeline to play and seek it, and the review of the record. The
 * log is loaded and indexed once; each moment is a snapshot plus at most a few hundred events (stateAt), and the
 * figures are worked out only for the moment shown.
 */
export function ReplayView({ sessionId, standing, selfId, unitSystem, machineLabel, technicianName, fallbackScrews, table, travelMm, canReview, instruments }: Props) {
  const { index, error, loading, refresh } = useReplayLog(sessionId);
  const timeline = useMemo(() => (index ? timelineOf(index, MAX_GAP_MS) : null), [index]);
  const player = usePlayer(timeline?.clock ?? null, timeline?.totalMs ?? 0);
  const { seq } = player;

  // The moment itself (state, stage verdict) follows the playhead at once: a snapshot plus at most a few hundred events.
  // The engine's figures follow it as a deferred value, so a seek or a frame of playback never waits for them.
  const keptStates = useKept<number, SessionState>(index);
  const keptFigures = useKept<string, Figures>(index);
  const state = useMemo(() => (index ? keptStates(seq, () => stateAt(index, seq)) : null), [index, keptStates, seq]);
  const verdict = useMemo(() => (state ? stageVerdict(state, state.stage, unitSystem) : null), [state, unitSystem]);
  const figuresSeq = useDeferredValue(seq);
  const figuresState = useMemo(() => (index ? keptStates(figuresSeq, () => stateAt(index, figuresSeq)) : null), [figuresSeq, index, keptStates]);
  const figures = useMemo(() => (figuresState ? keptFigures(figuresKey(figuresState), () => figuresOf(figuresState)) : null), [figuresState, keptFigures]);
  const figuresLag = figuresSeq !== seq;

  const markers = useMemo(() => (timeline ? stageMarkers(timeline.clock) : []), [timeline]);
  const marks = useMemo(() => (index ? recordMarks(index) : []), [index]);
  const pins = useMemo<Pin[]>(() => (index ? index.final.review.comments.map((c) => ({ seq: c.seq, atSeq: c.atSeq, text: c.text })) : []), [index]);
  const spanMs = useMemo(() => {
    if (!index || index.events.length === 0) return undefined;
    // The charts' time axis: the work itself, from the first event to the last end (review events come later).
    const ends = marks.filter((m) => m.kind === 'ended');
    const lastWork = ends.length > 0 ? ends.at(-1)!.seq : lastSeqOf(index);
    const t0 = Date.parse(index.events[0]!.serverTs);
    return { t0, t1: t0 + realOffsetOf(index, lastWork) };
  }, [index, marks]);

  const { seek, step, toggle, setSpeed, seekOffset } = player;
  const stepStage = useCallback(
    (dir: 1 | -1) => {
      const target = dir === 1 ? markers.find((m) => m.seq > seq) : [...markers].reverse().find((m) => m.seq < seq);
      if (target) seek(target.seq);
      else if (dir === -1) seek(0);
    },
    [markers, seek, seq],
  );

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target instanceof HTMLElement ? e.target : null;
      if (t && (t.isContentEditable || ['INPUT', 'TEXTAREA', 'SELECT'].includes(t.tagName) || t.closest('dialog[open]') || t.tagName === 'CANVAS')) return;
      if (e.altKey || e.ctrlKey || e.metaKey) return;
      if (e.key === ' ') {
        e.preventDefault();
        toggle();
      } else if (e.key === 'ArrowRight' || e.key === 'ArrowLeft') {
        e.preventDefault();
        const dir = e.key === 'ArrowRight' ? 1 : -1;
        if (e.shiftKey) stepStage(dir);
        else step(dir);
      } else if (e.key === 'Home') {
        e.preventDefault();
        seek(0);
      } else if (e.key === 'End' && index) {
        e.preventDefault();
        seek(lastSeqOf(index));
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [index, seek, step, stepStage, toggle]);

  const whoMade = useCallback(
    (s: number) => {
      if (!index) return '';
      const e = index.events[countThrough(index, s) - 1];
      if (!e || e.seq !== s) return '';
      if (e.actorId === selfId) return 'You';
      return index.final.participants.find((p) => p.userId === e.actorId)?.name ?? ROLE_WORDS[e.actorRole] ?? e.actorRole;
    },
    [index, selfId],
  );
  const model = figures?.model ?? null;
  const shapeKey = model ? [model.state.tiltXUrad, model.state.tiltYUrad, model.state.twistUrad, model.state.bowUrad].map((v) => v.toFixed(3)).join(',') : 'none';
  // One object while the figures are unchanged, so the tilt view redraws only when the shape moves (as in the coach view).
  const shape = useMemo(
    () => (model ? { tiltXUrad: model.state.tiltXUrad, tiltYUrad: model.state.tiltYUrad, twistUrad: model.state.twistUrad, bowUrad: model.state.bowUrad } : null),
    [shapeKey],
  );
  const momentLabel = useCallback((s: number) => (index ? `seq ${s} · ${elapsed(realOffsetOf(index, s))}` : `seq ${s}`), [index]);

  // The lists only grow or change with their own events: each is drawn again only when its length (or, for moves,
  // the answers) changes, not on every step of the playhead. A stateAt copy is a new object each time, hence the keys.
  const record = index?.final ?? null;
  const screws = record && record.screws.length > 0 ? record.screws : fallbackScrews;
  const readingsKey = state?.readings.length ?? 0;
  const movesKey = state ? figuresKey(state) : '';
  const notesKey = state?.notes.length ?? 0;
  const photosKey = state?.photos.length ?? 0;
  const feedEl = useMemo(
    () => state && <ReadingFeed readings={state.readings} screws={screws} unitSystem={unitSystem} title="Readings at this moment" emptyText="No readings yet at this moment." limit={FEED_ROWS} />,
    [readingsKey, screws, unitSystem],
  );
  const movesEl = useMemo(() => state && <MovesList moves={state.moves} screws={screws} unitSystem={unitSystem} limit={MOVES_SHOWN} />, [movesKey, screws, unitSystem]);
  const notesEl = useMemo(
    () => state && record && <NotesPanel notes={state.notes.slice(-NOTES_SHOWN)} participants={record.participants} selfId={selfId} canPost={false} onPost={async () => undefined} />,
    [notesKey, record, selfId],
  );
  const photosEl = useMemo(() => state && <PhotosPanel sessionId={sessionId} photos={state.photos} />, [photosKey, sessionId]);
  // The tilt view is the heaviest to draw: it follows the deferred moment with the base model it shows.
  const scene = figuresState ? sceneOf(figuresState, unitSystem) : null;
  const travel = figuresState?.travelMm ?? travelMm;
  const tiltEl = useMemo(
    () =>
      scene && (
        <TiltPanel screws={screws} table={table} travelMm={travel} shape={shape} level={scene.level} sweep={scene.sweep} moves={scene.moves} unitSystem={unitSystem} />
      ),
    [scene?.key, screws, table, travel, shape, unitSystem],
  );
  // The summary is of the whole record (its final state), not of the playhead's moment.
  const times = useMemo(() => (index ? timesOf(index.events) : undefined), [index]);
  const summaryEl = useMemo(
    () => record && <SummaryPanel sessionId={sessionId} state={record} units={unitSystem} instruments={instruments} times={times} />,
    [record, sessionId, unitSystem, instruments, times],
  );
  const chartEl = useMemo(() => figures && <LiveChart series={figures.series} unitSystem={unitSystem} spanMs={spanMs} />, [figures, unitSystem, spanMs]);

  if (error) {
    return (
      <main className="mx-auto grid max-w-xl grid-cols-[minmax(0,1fr)] gap-3 p-6">
        <h1 className="text-2xl font-bold">The record could not be loaded</h1>
        <p role="alert" className="text-fail">
          {error.message}
        </p>
        <Link href={`/sessions/${sessionId}`} className="font-semibold underline underline-offset-4">
          Back to the session
        </Link>
      </main>
    );
  }
  if (loading || !index || !record || !timeline || !state || !verdict || !figures) {
    return (
      <main className="grid place-items-center p-10 text-ink-soft" aria-busy="true">
        Loading the session’s log…
      </main>
    );
  }

  return (
    <main className="grid gap-4 p-4 xl:grid-cols-[minmax(0,1fr)_28rem] min-[1400px]:grid-cols-[minmax(0,1fr)_31rem]">
      <header className="flex flex-wrap items-center justify-between gap-3 xl:col-span-2">
        <div>
          <p className="text-sm font-semibold uppercase tracking-wide text-ink-soft">
            Replay · technician: {technicianName} · {index.events.length} events
          </p>
          <h1 className="text-2xl font-bold">{record.machineLabel ?? machineLabel}</h1>
        </div>
        <div className="flex flex-wrap items-center gap-2">
          <StatusChip status={record.status} />
          <Link href={`/sessions/${sessionId}/${standing === 'technician' ? 'field' : 'coach'}`} className="min-h-11 content-center rounded-lg border-2 border-ink px-3 font-semibold hover:bg-paper">
            {standing === 'technician' ? 'Field view' : 'Coach view'}
          </Link>
        </div>
        {record.status === 'live' && (
          <p role="status" className="w-full rounded-lg bg-vial/40 px-3 py-2 text-sm font-semibold">
            This session is still live: the replay runs up to its latest event and picks up new ones every few seconds. Reviewing opens once it has ended.
          </p>
        )}
      </header>

      <Timeline
          index={index}
          clock={timeline.clock}
          totalMs={timeline.totalMs}
          shortened={timeline.shortened}
          maxGapMs={MAX_GAP_MS}
          seq={seq}
          playing={player.playing}
          speed={player.speed}
          markers={markers}
          pins={pins}
          marks={marks}
          onToggle={toggle}
          onSpeed={setSpeed}
          onStep={step}
          onSeek={seek}
          onSeekOffset={seekOffset}
          className="xl:col-span-2"
        />

      <div className="grid min-w-0 content-start gap-4" data-testid="replay-moment" data-seq={seq}>
        <div
          className={`grid gap-3 transition-opacity xl:grid-cols-[minmax(0,1fr)_12rem] 2xl:grid-cols-[minmax(0,1fr)_14rem] ${figuresLag ? 'opacity-80' : ''}`}
          data-testid="replay-figures"
          data-seq={figuresSeq}
          aria-busy={figuresLag}
        >
          {tiltEl}
          <BaseNumbers model={model} tolerances={tolerancesOf(state)} unitSystem={unitSystem} />
        </div>
        <div className={figuresLag ? 'opacity-80' : ''}>
          {chartEl}
        </div>
        <div className="grid gap-4 lg:grid-cols-2">
          <div className="grid content-start gap-2">
            <p className="flex flex-wrap gap-x-4 text-sm">
              <span>
                X reading then: <b className="tabular" data-testid="slope-x">{state.slopeXUrad === null ? '—' : formatSlope(state.slopeXUrad, unitSystem)}</b>
              </span>
              <span>
                Y reading then: <b className="tabular" data-testid="slope-y">{state.slopeYUrad === null ? '—' : formatSlope(state.slopeYUrad, unitSystem)}</b>
              </span>
            </p>
            {feedEl}
          </div>
          {photosEl}
        </div>
      </div>

      <aside className="grid min-w-0 content-start gap-3" aria-label="Review and the moment’s stage">
        <StagePanel state={state} verdict={verdict} />
        <ReviewPanel
          sessionId={sessionId}
          record={record}
          canReview={canReview}
          seq={seq}
          momentOf={momentLabel}
          whoMade={whoMade}
          onSeek={seek}
          onStored={refresh}
        />
        {movesEl}
        {notesEl}
      </aside>

      <section aria-label="The record as a whole" className="grid min-w-0 gap-4 xl:col-span-2">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <ReportActions sessionId={sessionId} status={record.status} canSend={canReview} />
          <ExportLinks sessionId={sessionId} />
        </div>
        {summaryEl}
      </section>
    </main>
  );
}
