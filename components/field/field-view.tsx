'use client';

import { useEffect, useMemo, useRef, useState } from 'react';
import { formatPosition } from '@/lib/display-units';
import type { UnitSystem } from '@/lib/leveling/units';
import type { ReadingInput } from '@/lib/session/commands';
import { currentRound, readingKey, stageChecklist, stagePlan, stageVerdict, stations, type PlannedReading, type Verdict } from '@/lib/session/derive';
import { SESSION_STAGES, STAGE_GUIDES, STANDING_CAUTIONS, nextStage, type SessionStage } from '@/lib/session/stages';
import { CautionList } from '@/components/session/caution-list';
import { AddParticipant } from '@/components/session/add-participant';
import { registerFieldWorker } from '@/components/session/register-field-worker';
import { useLiveSession } from '@/components/session/use-live-session';
import { loadCommandSchemas } from './command-schemas';
import { FinishSession } from './finish-session';
import { answeredInOutbox, keyOfInput, pendingChecks, pendingNotes, pendingReadings, pendingStage, placementOf } from './field-logic';
import { LinkStrip } from './link-strip';
import { MoveCard } from './move-card';
import { NotesPanel } from './notes-panel';
import { PhotoPanel } from './photo-panel';
import { usePhotoQueue } from './use-photo-queue';
import { ReadingEntry } from './reading-entry';
import { ReturnedBanner } from './returned-banner';
import { StageReadings } from './stage-readings';
import { StageStepper } from './stage-stepper';
import { TopView } from './top-view';

type Props = {
  sessionId: string;
  /** The signed-in technician: the outbox sends only their own entries. */
  userId: string;
  unitSystem: UnitSystem;
  machineLabel: string;
  /** The table's size, for the top view (length along X, width along Y), when the machine record has it. */
  tableMm: { lengthMm: number; widthMm: number } | null;
};

const verdictLook: Record<Verdict['status'], { text: string; cls: string }> = {
  pass: { text: 'Pass', cls: 'bg-pass text-white' },
  fail: { text: 'Fail', cls: 'bg-fail text-white' },
  incomplete: { text: 'Incomplete', cls: 'bg-rule text-ink' },
};

type Spot = { axis: 'x' | 'y'; positionMm: number };

/**
 * The technician's screen during a session (phone and tablet first, big targets): moves from the coach on top, then
 * the stage with its guide, cautions, checklist, the readings it asks for on a top view, the entry form, and notes
 * and photos. Everything typed goes through the outbox, so the screen keeps working without a link.
 */
export function FieldView({ sessionId, userId, unitSystem, machineLabel, tableMm }: Props) {
  const { events, state, link, outbox, rejected, dismissRejected, send, seen } = useLiveSession(sessionId, userId);
  const photoQueue = usePhotoQueue(sessionId, userId, link === 'live');

  useEffect(() => {
    // The checks' schemas load first, so the worker's cache takes their script with the rest of the page.
    void loadCommandSchemas()
      .catch(() => undefined)
      .then(() => registerFieldWorker());
  }, []);

  const stage: SessionStage = pendingStage(outbox) ?? state.stage;
  const guide = STAGE_GUIDES[stage];
  const plan = useMemo(() => stagePlan(stage, state), [stage, state]);
  const round = useMemo(() => currentRound(state, stage), [state, stage]);
  const verdicts = useMemo(() => Object.fromEntries(SESSION_STAGES.map((s) => [s, stageVerdict(state, s, unitSystem)])) as Record<SessionStage, Verdict>, [state, unitSystem]);
  const verdict = verdicts[stage];
  const queuedReadings = useMemo(() => pendingReadings(outbox), [outbox]);
  const stagePending = queuedReadings.filter((p) => (p.reading.stage ?? stage) === stage);
  const pendingKeys = new Set(stagePending.map((p) => keyOfInput(p.reading)));
  const answering = answeredInOutbox(outbox);
  const moves = state.moves.filter((m) => m.status === 'pending' && !answering.has(m.moveId));
  const checksQueued = pendingChecks(outbox);
  const screwLabel = (id: string) => state.screws.find((s) => s.id === id)?.label ?? 'screw';
  // A new move from the coach: bring it into view, whatever the technician was scrolled to.
  const movesRef = useRef<HTMLElement>(null);
  const newestMove = moves.at(-1)?.moveId ?? null;
  useEffect(() => {
    if (newestMove) movesRef.current?.scrollIntoView({ behavior: 'smooth', block: 'start' });
  }, [newestMove]);
  const [localChecks, setLocalChecks] = useState<Record<string, { done: boolean; id: string }>>({});
  const checklist = stageChecklist(stage, state.screws);
  const ended = state.ended !== null;

  const [selectedKey, setSelectedKey] = useState<string | null>(null);
  const [spot, setSpot] = useState<Spot | null>(null);
  const [confirmNext, setConfirmNext] = useState(false);
  const [lastReadingId, setLastReadingId] = useState<string | null>(null);
  useEffect(() => {
    setSelectedKey(null);
    setSpot(null);
    setConfirmNext(false);
  }, [stage]);

  const firstOpen = plan.find((p) => !round.has(readingKey(p)) && !pendingKeys.has(readingKey(p)));
  const selected: PlannedReading | null = spot
    ? { kind: 'level', axis: spot.axis, positionMm: spot.positionMm, label: `Spot reading · ${spot.axis === 'x' ? 'X across' : 'Y along'}` }
    : (plan.find((p) => readingKey(p) === selectedKey) ?? firstOpen ?? plan[0] ?? null);
  const spotStations = stations(state.travelMm ?? 500, 3);
  const showSpotChooser = spot !== null || plan.length === 0;

  async function record(reading: ReadingInput) {
    const id = await send('reading:submit', { reading });
    setLastReadingId(id);
    if (!spot && selected) {
      const key = readingKey(selected);
      const after = plan.slice(plan.findIndex((p) => readingKey(p) === key) + 1);
      const next = [...after, ...plan].find((p) => readingKey(p) !== key && !round.has(readingKey(p)) && !pendingKeys.has(readingKey(p)));
      setSelectedKey(next ? readingKey(next) : key);
    }
  }

  const lastStatus = (() => {
    if (!lastReadingId) return null;
    if (rejected.some((r) => r.id === lastReadingId)) return null; // shown as refused above
    const stored = events.find((e) => e.id === lastReadingId);
    if (stored) return `Reading stored as #${stored.seq}`;
    if (outbox.some((c) => c.id === lastReadingId)) return link === 'live' ? 'Reading sending…' : 'Reading kept on this device; it goes out when the link is back';
    return null;
  })();

  function enter(target: SessionStage) {
    setConfirmNext(false);
    void send('stage:enter', { stage: target });
  }
  const next = nextStage(stage);

  function mark(item: string, done: boolean) {
    const id = crypto.randomUUID();
    setLocalChecks((c) => ({ ...c, [item]: { done, id } }));
    void send('check:mark', { id, stage, item, done });
  }
  const isChecked = (item: string) => {
    const local = localChecks[item];
    if (local && !rejected.some((r) => r.id === local.id)) return local.done;
    return checksQueued.get(item) ?? state.checks[item] ?? false;
  };

  const storedInStage = state.readings.filter((r) => r.stage === stage);
  const roundSeqs = new Set([...round.values()].map((r) => r.seq));

  return (
    <main className="mx-auto grid max-w-3xl grid-cols-[minmax(0,1fr)] grid-cols-[minmax(0,1fr)] gap-4 p-3 pb-16 sm:p-4">
      <div className="sticky top-0 z-20 -mx-3 grid gap-2 border-b-2 border-rule bg-paper/95 px-3 py-2 backdrop-blur sm:-mx-4 sm:px-4">
        <h1 className="truncate text-base font-bold leading-tight">
          <span className="sr-only">Field view: </span>
          {machineLabel}
        </h1>
        <LinkStrip link={link} pending={outbox.length + photoQueue.waiting.length} rejected={rejected} onDismiss={dismissRejected} />
        {moves.length > 0 && (
          <a href="#moves" className="flex min-h-12 items-center justify-between gap-2 rounded-lg bg-bubble px-3 font-bold text-ink">
            <span>
              {moves.length === 1 ? 'A move waits' : `${moves.length} moves wait`}: {moves.map((m) => `${m.raiseUm >= 0 ? '▲' : '▼'} ${screwLabel(m.screwId)}`).join(', ')}
            </span>
            <span aria-hidden>↓</span>
          </a>
        )}
      </div>

      {state.status === 'returned' && <ReturnedBanner sessionId={sessionId} review={state.review} online={link === 'live'} />}
      {ended && state.status !== 'returned' && (
        <p role="status" className="rounded-xl bg-steel p-3 text-lg font-bold text-paper">
          {state.status === 'approved' && state.review.approval
            ? `This session’s record was approved by ${state.review.approval.name}. Nothing more can be recorded.`
            : `This session has ended${state.ended?.reason ? `: ${state.ended.reason}` : ''}. Nothing more can be recorded${state.status === 'in_review' ? '; it is in review' : ''}.`}{' '}
          <a href={`/sessions/${sessionId}/replay`} className="font-semibold text-vial underline underline-offset-4">
            Replay
          </a>
        </p>
      )}

      {moves.length > 0 && (
        <section id="moves" ref={movesRef} aria-label="Moves to make" className="grid scroll-mt-48 gap-3">
          {moves.map((m) => (
            <MoveCard
              key={m.moveId}
              move={m}
              screwLabel={screwLabel(m.screwId)}
              sessionId={sessionId}
              unitSystem={unitSystem}
              onAnswer={async (body) => void (await send('move:answer', body))}
              topView={<TopView compact screws={state.screws} tableMm={tableMm} travelYMm={state.travelMm} placement={null} movingScrewIds={new Set([m.screwId])} />}
            />
          ))}
        </section>
      )}

      <StageStepper current={stage} verdicts={verdicts} onBack={enter} disabled={ended} />

      <section data-testid="stage-panel" data-stage={stage} aria-labelledby="stage-h" className="grid grid-cols-[minmax(0,1fr)] gap-4 rounded-2xl border-2 border-ink bg-card p-3 sm:p-4">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <h2 id="stage-h" className="text-2xl font-bold">
            <span className="tabular text-ink-soft">{SESSION_STAGES.indexOf(stage) + 1}/10</span> {guide.title}
          </h2>
          <span data-testid="stage-verdict" data-status={verdict.status} className={`rounded-full px-4 py-1 text-lg font-bold ${verdictLook[verdict.status].cls}`}>
            {verdictLook[verdict.status].text}
          </span>
        </div>

        <details open className="rounded-lg border-l-8 border-bubble bg-bubble/10 p-3">
          <summary className="min-h-10 cursor-pointer content-center font-bold">
            ⚠ Cautions ({guide.cautions.length + STANDING_CAUTIONS.length})
          </summary>
          <CautionList cautions={guide.cautions} className="mt-1 grid list-disc gap-1 pl-5 leading-snug" />
        </details>

        <details open className="rounded-lg bg-paper p-3">
          <summary className="min-h-10 cursor-pointer content-center font-bold">What to do</summary>
          <ol className="mt-1 grid list-decimal gap-1 pl-5">
            {guide.steps.map((s) => (
              <li key={s}>{s}</li>
            ))}
          </ol>
          <p className="mt-2">
            <span className="font-semibold">Where: </span>
            {guide.placement}
          </p>
        </details>

        {checklist.length > 0 && (
          <fieldset className="grid gap-2">
            <legend className="mb-1 text-lg font-bold">Checklist</legend>
            {checklist.map((c) => (
              <label key={c.id} className="flex min-h-14 cursor-pointer items-center gap-3 rounded-lg border-2 border-ink bg-card px-3 text-lg has-[:checked]:bg-pass/10">
                <input type="checkbox" className="h-7 w-7 shrink-0 accent-spirit" checked={isChecked(c.id)} disabled={ended} onChange={(e) => mark(c.id, e.target.checked)} />
                {c.label}
              </label>
            ))}
          </fieldset>
        )}

        {plan.length > 0 && (
          <div className="grid gap-2">
            <h3 className="text-lg font-bold">Readings this stage asks for</h3>
            <ul className="grid grid-cols-2 gap-2 sm:grid-cols-3">
              {plan.map((p) => {
                const key = readingKey(p);
                const taken = round.has(key);
                const waiting = pendingKeys.has(key);
                const isSelected = !spot && selected !== null && readingKey(selected) === key;
                return (
                  <li key={key}>
                    <button
                      type="button"
                      data-testid="planned-reading"
                      data-key={key}
                      data-taken={taken ? 'true' : 'false'}
                      data-pending={waiting ? 'true' : 'false'}
                      aria-pressed={isSelected}
                      onClick={() => {
                        setSpot(null);
                        setSelectedKey(key);
                      }}
                      className={`grid min-h-14 w-full content-center rounded-lg border-2 px-2 py-1 text-left font-semibold ${
                        isSelected ? 'border-ink bg-steel text-paper' : taken ? 'border-pass bg-pass/10' : waiting ? 'border-bubble bg-bubble/10' : 'border-ink bg-card'
                      }`}
                    >
                      <span className="leading-tight">{p.label}</span>
                      <span className="text-sm font-normal">{taken ? '✓ taken' : waiting ? '… pending' : 'to take'}</span>
                    </button>
                  </li>
                );
              })}
            </ul>
          </div>
        )}

        <TopView
          screws={state.screws}
          tableMm={tableMm}
          travelYMm={state.travelMm}
          placement={placementOf(selected)}
          movingScrewIds={new Set(moves.map((m) => m.screwId))}
        />

        {showSpotChooser && (
          <div className="grid gap-2 rounded-xl border-2 border-rule p-3">
            <h3 className="font-bold">{plan.length === 0 ? 'Spot level reading (optional, e.g. as-found)' : 'Another level reading'}</h3>
            <div className="grid grid-cols-2 gap-2">
              {(['x', 'y'] as const).map((a) => (
                <button
                  key={a}
                  type="button"
                  aria-pressed={spot?.axis === a}
                  onClick={() => setSpot({ axis: a, positionMm: spot?.positionMm ?? 0 })}
                  className={`min-h-14 rounded-lg border-2 border-ink font-bold ${spot?.axis === a ? 'bg-steel text-paper' : 'bg-card'}`}
                >
                  {a === 'x' ? 'X · across' : 'Y · along'}
                  <span className="block text-sm font-normal">{a === 'x' ? 'marked end to the right' : 'marked end to the back'}</span>
                </button>
              ))}
            </div>
            <div className="grid grid-cols-3 gap-2">
              {spotStations.map((st) => (
                <button
                  key={st.label}
                  type="button"
                  aria-pressed={spot?.positionMm === st.positionMm}
                  onClick={() => setSpot({ axis: spot?.axis ?? 'x', positionMm: st.positionMm })}
                  className={`min-h-14 rounded-lg border-2 border-ink font-bold ${spot?.positionMm === st.positionMm ? 'bg-steel text-paper' : 'bg-card'}`}
                >
                  {st.label[0]!.toUpperCase() + st.label.slice(1)}
                  <span className="block text-sm font-normal tabular">{formatPosition(st.positionMm, unitSystem)}</span>
                </button>
              ))}
            </div>
            {spot && plan.length > 0 && (
              <button type="button" onClick={() => setSpot(null)} className="min-h-12 font-semibold underline underline-offset-4">
                Back to the planned readings
              </button>
            )}
          </div>
        )}
        {!showSpotChooser && (
          <button type="button" onClick={() => setSpot({ axis: 'x', positionMm: 0 })} className="min-h-12 justify-self-start font-semibold underline underline-offset-4">
            Another level reading
          </button>
        )}

        {selected && !ended && (
          <ReadingEntry
            key={spot ? `spot:${spot.axis}:${spot.positionMm}` : readingKey(selected)}
            target={selected}
            stage={stage}
            unitSystem={unitSystem}
            screws={state.screws}
            onRecord={record}
          />
        )}
        {lastStatus && (
          <p role="status" className="rounded-lg bg-pass/10 p-3 font-semibold text-pass">
            {lastStatus}
          </p>
        )}

        <StageReadings state={state} plan={plan} stored={storedInStage} roundSeqs={roundSeqs} pending={stagePending} verdict={verdict} unitSystem={unitSystem} />

        {next && !ended && (
          <div className="grid gap-2 border-t-2 border-rule pt-3">
            {confirmNext ? (
              <div role="alertdialog" aria-labelledby="confirm-h" className="grid gap-2 rounded-xl border-2 border-fail bg-fail/5 p-3">
                <p id="confirm-h" className="text-lg font-bold">
                  {guide.title} {verdict.status === 'fail' ? 'fails' : 'is not complete'}. Continue anyway?
                </p>
                <ul className="list-disc pl-5">
                  {verdict.detail.map((d) => (
                    <li key={d}>{d}</li>
                  ))}
                </ul>
                <div className="grid grid-cols-2 gap-2">
                  <button type="button" onClick={() => setConfirmNext(false)} className="min-h-14 rounded-xl border-2 border-ink bg-card text-lg font-bold">
                    Stay
                  </button>
                  <button type="button" onClick={() => enter(next)} className="min-h-14 rounded-xl bg-fail text-lg font-bold text-white">
                    Continue anyway
                  </button>
                </div>
              </div>
            ) : (
              <button
                type="button"
                onClick={() => (verdict.status === 'pass' ? enter(next) : setConfirmNext(true))}
                className={`min-h-16 rounded-xl text-xl font-bold ${verdict.status === 'pass' ? 'bg-spirit text-white' : 'border-2 border-ink bg-card'}`}
              >
                Next stage
                <span className="block text-sm font-normal">{STAGE_GUIDES[next].title}</span>
              </button>
            )}
          </div>
        )}
        {!next && !ended && (
          <FinishSession
            verdict={verdict}
            waiting={outbox.length + photoQueue.waiting.length}
            online={link === 'live'}
            onFinish={async (reason) => void (await send('session:end', reason ? { reason } : {}))}
          />
        )}
      </section>

      <NotesPanel sessionId={sessionId} notes={state.notes} pending={pendingNotes(outbox)} participants={state.participants} disabled={ended} onPost={async (body) => void (await send('note:post', body))} />
      <PhotoPanel sessionId={sessionId} stage={stage} photos={state.photos} queue={photoQueue} online={link === 'live'} disabled={ended} />
      {!ended && link === 'live' && <AddParticipant sessionId={sessionId} participants={state.participants} large />}

      <output hidden data-testid="seen-seqs">
        {seen.current.join(',')}
      </output>
    </main>
  );
}
