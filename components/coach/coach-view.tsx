'use client';

import { useMemo, useRef, useState } from 'react';
import { stageScrews, type BaseModel, type ScrewMove } from '@/lib/leveling';
import { formatSlope, type UnitSystem } from '@/lib/leveling/units';
import { baseModelOf, learnedResponse, recommendedMoves } from '@/lib/session/advice';
import { adjustStageOf, engineScrews, pendingMoves, stageVerdict, tolerancesOf } from '@/lib/session/derive';
import type { SessionScrew } from '@/lib/session/events';
import type { SessionState } from '@/lib/session/fold';
import { sessionSeries } from '@/lib/session/series';
import { STAGE_GUIDES } from '@/lib/session/stages';
import { AddParticipant } from '@/components/session/add-participant';
import { useLiveSession, type Link } from '@/components/session/use-live-session';
import { ChainCheck } from './chain-check';
import { BaseNumbers } from './base-numbers';
import { EndSession } from './end-session';
import { clock, type Standing } from './format';
import { LiveChart } from './live-chart';
import { ManualMove, RecommendedMoves, type SendMove } from './move-panel';
import { MovesList } from './moves-list';
import { NotesPanel } from './notes-panel';
import { PhotosPanel } from './photos-panel';
import { PresencePanel } from './presence-panel';
import { ReadingFeed } from './reading-feed';
import { CoachCautions, StagePanel } from './stage-panel';
import { sceneOf } from './scene';
import { TiltPanel } from './tilt-panel';

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
  /** An admin may call people into a session (besides its technician, who does it from the field view). */
  mayAddPeople: boolean;
};

const LINK_LOOK: Record<Link, { text: string; cls: string }> = {
  connecting: { text: 'Connecting…', cls: 'bg-rule text-ink' },
  live: { text: 'Live', cls: 'bg-pass text-white' },
  offline: { text: 'Offline', cls: 'bg-fail text-white' },
};

const STANDING_NOTE: Record<Standing, string | null> = {
  expert: null,
  technician: 'You are this session’s technician: moves are answered in the field view.',
  observer: 'You are observing: you may post notes; moves are sent by the expert.',
  reader: 'You are reading this session: nothing here is sent.',
};

/** The engine can refuse a model it cannot fit (e.g. contradictory readings); the view then shows none rather than failing. */
function safely<T>(f: () => T, fallback: T): T {
  try {
    return f();
  } catch {
    return fallback;
  }
}

/** Why the engine recommends nothing now, in words. */
function noMovesReason(state: SessionState, model: BaseModel | null, verdict: ReturnType<typeof stageVerdict>, canSend: boolean): string {
  const title = STAGE_GUIDES[state.stage].title;
  if (state.ended) return 'The session has ended.';
  const adjust = adjustStageOf(state.stage);
  if (!adjust) return `No screws are turned in the ${title.toLowerCase()} stage.`;
  if (stageScrews(adjust, engineScrews(state.screws)).length === 0) return `${title} is corrected on the middle screws, and this footprint has none${canSend ? ': advise by note or write a move' : ''}.`;
  const pending = pendingMoves(state).length;
  if (pending > 0) return `Waiting for the technician to answer ${pending} move${pending === 1 ? '' : 's'}.`;
  if (!model) return 'Waiting for the first level readings.';
  if (verdict.status === 'incomplete') return `Waiting for this round’s readings (${verdict.detail.length} to take).`;
  if (verdict.status === 'pass') return `${title} is within tolerance: no moves needed.`;
  return `The engine found no move that helps${canSend ? '; write one if needed' : ''}.`;
}

/** The expert's screen: the tilt view, the engine's moves, the measures by round, the stage, presence and notes. */
export function CoachView({ sessionId, standing, selfId, unitSystem, machineLabel, technicianName, fallbackScrews, table, travelMm, mayAddPeople }: Props) {
  const { events, state, link, presence, outbox, rejected, dismissRejected, send, seen } = useLiveSession(sessionId, selfId);
  const [sending, setSending] = useState(false);
  const screws = state.screws.length > 0 ? state.screws : fallbackScrews;
  const travel = state.travelMm ?? travelMm;
  const response = useMemo(() => safely(() => learnedResponse(state), null), [state]);
  const model = useMemo(() => safely(() => baseModelOf(state, response), null), [state, response]);
  const recommended = useMemo<ScrewMove[]>(() => safely(() => recommendedMoves(state, model, response), []), [state, model, response]);
  const verdict = useMemo(() => stageVerdict(state, state.stage, unitSystem), [state, unitSystem]);
  const series = useMemo(() => sessionSeries(state), [state]);
  const tolerances = tolerancesOf(state);
  const ended = state.ended !== null;
  const canSendMoves = standing === 'expert' && !ended;
  const canPost = standing !== 'reader' && !ended;
  const canEnd = (standing === 'expert' || standing === 'technician') && !ended;
  const moveBusy = sending || outbox.some((c) => c.name === 'move:send');

  const currentScene = sceneOf(state, unitSystem);
  // One object while the scene is unchanged (its key stands for it), so the tilt view redraws only when it moves.
  const scene = useMemo(() => currentScene, [currentScene.key]);
  const shape = model ? { tiltXUrad: model.state.tiltXUrad, tiltYUrad: model.state.tiltYUrad, twistUrad: model.state.twistUrad, bowUrad: model.state.bowUrad } : null;
  const shapeKey = shape ? Object.values(shape).map((v) => v.toFixed(3)).join(',') : 'none';
  // A stable object while the model's figures are unchanged (shapeKey stands for shape), so the canvas redraws only when the shape moves.
  const stableShape = useMemo(() => shape, [shapeKey]);
  const recKey = recommended.map((m) => `${m.id}:${m.turns.toFixed(4)}`).join('|') + `@${state.seq}`;

  const outboxRef = useRef(outbox);
  outboxRef.current = outbox;
  const linkRef = useRef(link);
  linkRef.current = link;
  const eventsRef = useRef(events);
  eventsRef.current = events;
  const sendMove: SendMove = async (m) => {
    setSending(true);
    try {
      const id = await send('move:send', { stage: state.stage, screwId: m.screwId, turns: m.turns, recommended: m.recommended, ...(m.note ? { note: m.note } : {}) });
      // While live, let each move be acknowledged before the next is queued: a command queued while the outbox is
      // being sent otherwise waits for the hook's next retry (up to 8 s), and "Send all" would trickle in.
      const delivered = () => eventsRef.current.some((e) => e.id === id) && !outboxRef.current.some((c) => c.id === id);
      for (let waited = 0; linkRef.current === 'live' && waited < 4000 && !delivered(); waited += 50) {
        await new Promise((r) => setTimeout(r, 50));
      }
    } finally {
      setSending(false);
    }
  };
  const look = LINK_LOOK[link];

  return (
    <main className="grid gap-4 p-4 xl:grid-cols-[minmax(0,1fr)_28rem] min-[1400px]:grid-cols-[minmax(0,1fr)_33rem]">
      <output hidden data-testid="seen-seqs">
        {seen.current.join(',')}
      </output>
      <header className="flex flex-wrap items-center justify-between gap-3 xl:col-span-2">
        <div>
          <p className="text-sm font-semibold uppercase tracking-wide text-ink-soft">
            Coach view · technician: {technicianName} · {events.length > 0 ? `log #${state.seq}` : 'loading the log'}
          </p>
          <h1 className="text-2xl font-bold">{state.machineLabel ?? machineLabel}</h1>
        </div>
        <div className="flex flex-wrap items-center gap-2">
          {outbox.length > 0 && (
            <span className="rounded-full bg-bubble px-3 py-1 font-semibold" data-testid="outbox-count">
              {outbox.length} waiting to send
            </span>
          )}
          <span role="status" data-testid="link-state" data-link={link} className={`rounded-full px-4 py-2 font-bold ${look.cls}`}>
            {look.text}
          </span>
          <ChainCheck sessionId={sessionId} />
          {canEnd && <EndSession onEnd={async (reason) => void (await send('session:end', reason ? { reason } : {}))} />}
        </div>
        {STANDING_NOTE[standing] && <p className="w-full rounded-lg bg-steel/10 px-3 py-2 text-sm">{STANDING_NOTE[standing]}</p>}
        {state.ended && (
          <p className="w-full rounded-lg bg-ink px-3 py-2 font-semibold text-paper" role="status">
            Session ended at {clock(state.ended.at)}
            {state.ended.reason ? `: ${state.ended.reason}` : ''}.
          </p>
        )}
        {rejected.map((r) => (
          <p key={r.id} role="alert" className="flex w-full items-center justify-between gap-2 rounded-lg bg-fail/10 px-3 py-2 font-semibold text-fail">
            <span>
              Not stored ({r.name}): {r.error.message}
            </span>
            <button type="button" className="underline" onClick={() => dismissRejected(r.id)}>
              Dismiss
            </button>
          </p>
        ))}
      </header>

      <div className="grid min-w-0 content-start gap-4">
        <div className="grid gap-3 xl:grid-cols-[minmax(0,1fr)_12rem] 2xl:grid-cols-[minmax(0,1fr)_14rem]">
          <TiltPanel
            screws={screws}
            table={table}
            travelMm={travel}
            shape={stableShape}
            level={scene.level}
            sweep={scene.sweep}
            moves={scene.moves}
            unitSystem={unitSystem}
          />
          <BaseNumbers model={model} tolerances={tolerances} unitSystem={unitSystem} />
        </div>
        <LiveChart series={series} unitSystem={unitSystem} />
        <div className="grid gap-4 lg:grid-cols-2">
          <div className="grid content-start gap-2">
            <p className="flex flex-wrap gap-x-4 text-sm">
              <span>
                Latest X reading: <b className="tabular" data-testid="slope-x">{state.slopeXUrad === null ? '—' : formatSlope(state.slopeXUrad, unitSystem)}</b>
              </span>
              <span>
                Latest Y reading: <b className="tabular" data-testid="slope-y">{state.slopeYUrad === null ? '—' : formatSlope(state.slopeYUrad, unitSystem)}</b>
              </span>
            </p>
            <ReadingFeed readings={state.readings} screws={screws} unitSystem={unitSystem} />
          </div>
          <PhotosPanel sessionId={sessionId} photos={state.photos} />
        </div>
      </div>

      <aside className="grid min-w-0 content-start gap-3" aria-label="Coaching">
        <StagePanel state={state} verdict={verdict} />
        <RecommendedMoves
          key={recKey}
          moves={recommended}
          screws={screws}
          unitSystem={unitSystem}
          emptyReason={noMovesReason(state, model, verdict, canSendMoves)}
          canSend={canSendMoves}
          busy={moveBusy}
          onSend={sendMove}
        />
        {canSendMoves && <ManualMove screws={screws} unitSystem={unitSystem} busy={moveBusy} onSend={sendMove} />}
        <MovesList moves={state.moves} screws={screws} unitSystem={unitSystem} />
        <PresencePanel presence={presence} participants={state.participants} selfId={selfId} simulated={state.virtualSeed !== null} />
        {mayAddPeople && !ended && <AddParticipant sessionId={sessionId} participants={state.participants} />}
        <NotesPanel notes={state.notes} participants={state.participants} selfId={selfId} canPost={canPost} onPost={async (text) => void (await send('note:post', { text }))} />
        <CoachCautions stageCautions={STAGE_GUIDES[state.stage].cautions} />
      </aside>
    </main>
  );
}
