'use client';

import { memo, useMemo, useRef } from 'react';
import { offsetOfSeq, type ReplayIndex, type StageMarker } from '@/lib/session/replay';
import { STAGE_GUIDES, SESSION_STAGES } from '@/lib/session/stages';
import { clock as clockTime } from '@/components/coach/format';
import type { EventType } from '@/lib/session/events';
import { duration, elapsed, fractionOf, lastSeqOf, realOffsetOf, shownCount, SPEEDS, type Shortened, type Speed } from './player-clock';

/** A reviewer's comment on the timeline: its own seq, and the moment (seq) it is pinned to. */
export type Pin = { seq: number; atSeq: number; text: string };
/** What happened to the record itself (an end, a return, the rework taken up, the approval), for marks under the track. */
export type RecordMark = { seq: number; kind: 'ended' | 'returned' | 'resumed' | 'approved' };

/** Each event in a few words, for the readout. */
const EVENT_WORDS: Record<EventType, string> = {
  'session:opened': 'session opened',
  'participant:added': 'someone called in',
  'reading:recorded': 'reading',
  'stage:entered': 'stage entered',
  'check:marked': 'checklist',
  'move:sent': 'move sent',
  'move:answered': 'move answered',
  'note:posted': 'note',
  'photo:attached': 'photo',
  'session:ended': 'session ended',
  'review:commented': 'review comment',
  'review:returned': 'returned for rework',
  'session:resumed': 'taken up again',
  'review:approved': 'approved',
};

const MARK_WORDS: Record<RecordMark['kind'], string> = { ended: 'Ended', returned: 'Returned', resumed: 'Taken up again', approved: 'Approved' };

type Props = {
  /** The real clock: the readout's elapsed time and the wall-clock time of the shown event. */
  index: ReplayIndex;
  /** The timeline's clock (long pauses shortened): positions on the track. */
  clock: ReplayIndex;
  totalMs: number;
  shortened: Shortened;
  maxGapMs: number;
  seq: number;
  playing: boolean;
  speed: Speed;
  markers: StageMarker[];
  pins: Pin[];
  marks: RecordMark[];
  onToggle: () => void;
  onSpeed: (s: Speed) => void;
  onStep: (dir: 1 | -1) => void;
  onSeek: (seq: number) => void;
  onSeekOffset: (ms: number) => void;
  /** Placement in the page's grid, for both parts (e.g. spanning its columns). */
  className?: string;
};

/** Marks closer than `gap` of the track's width go side by side in one group, drawn ending at the group's last mark. */
function groupMarks(marks: RecordMark[], place: (m: RecordMark) => number, gap = 0.08): RecordMark[][] {
  const groups: RecordMark[][] = [];
  for (const m of marks) {
    const last = groups.at(-1);
    if (last && place(m) - place(last.at(-1)!) < gap) last.push(m);
    else groups.push([m]);
  }
  return groups;
}

const stageNo = (m: StageMarker) => SESSION_STAGES.indexOf(m.stage) + 1;

/** The narrowest band drawn on its own, as a fraction of the track. */
const MIN_BAND = 0.002;
/** Beyond this many stage entries the list under the track shows each stage once, with how often it was entered. */
const LIST_ALL_UP_TO = 30;

/** The stage list: every entry, or for a long session each stage's first entry with its count. */
function listedMarkers(markers: StageMarker[]): { marker: StageMarker; times: number }[] {
  if (markers.length <= LIST_ALL_UP_TO) return markers.map((marker) => ({ marker, times: 1 }));
  const byStage = new Map<string, { marker: StageMarker; times: number }>();
  for (const m of markers) {
    const seen = byStage.get(m.stage);
    if (seen) seen.times += 1;
    else byStage.set(m.stage, { marker: m, times: 1 });
  }
  return [...byStage.values()];
}

/**
 * One band per stage entered on the scrubber. Memoised: a long session enters stages thousands of times, and the bands
 * change only with the log, not with the playhead (measured with scripts/bench-replay-browser.mjs).
 */
const StageBands = memo(function StageBands({ markers, totalMs }: { markers: StageMarker[]; totalMs: number }) {
  // A band narrower than a pixel or so is drawn as part of the one before it: a long session that enters stages
  // thousands of times would otherwise put thousands of nodes into the bar and make every seek relayout them.
  const drawn: StageMarker[] = [];
  for (const m of markers) {
    const prev = drawn.at(-1);
    if (!prev || fractionOf(m.offsetMs, totalMs) - fractionOf(prev.offsetMs, totalMs) >= MIN_BAND) drawn.push(m);
  }
  return drawn.map((m, i) => {
    const from = fractionOf(m.offsetMs, totalMs);
    const to = i + 1 < drawn.length ? fractionOf(drawn[i + 1]!.offsetMs, totalMs) : 1;
    return (
      <div
        key={m.seq}
        aria-hidden
        style={{ left: `${from * 100}%`, width: `${Math.max(0, to - from) * 100}%` }}
        className={`absolute inset-y-0 overflow-hidden border-l-2 border-steel px-1 pt-0.5 text-xs font-semibold leading-tight whitespace-nowrap ${i % 2 ? 'bg-spirit/15' : 'bg-steel/10'}`}
      >
        <span className="tabular">{stageNo(m)}</span> {STAGE_GUIDES[m.stage].title}
      </div>
    );
  });
});

/** A stage marker under the track; memoised so a seek redraws only the two whose highlight changes. */
const MarkerItem = memo(function MarkerItem({ marker: m, times, here, at, onSeek }: { marker: StageMarker; times: number; here: boolean; at: string; onSeek: (seq: number) => void }) {
  return (
    <li>
      <button
        type="button"
        data-testid="stage-marker"
        data-seq={m.seq}
        onClick={() => onSeek(m.seq)}
        aria-current={here ? 'step' : undefined}
        aria-label={`Stage ${stageNo(m)}: ${STAGE_GUIDES[m.stage].title}, seq ${m.seq}`}
        className={`min-h-9 rounded-full border-2 px-2.5 font-semibold ${here ? 'border-ink bg-steel text-paper' : 'border-rule bg-paper hover:border-ink'}`}
      >
        <span className="tabular">{stageNo(m)}</span> {STAGE_GUIDES[m.stage].title}
        <span className={`ml-1 tabular text-xs font-normal ${here ? 'text-paper/80' : 'text-ink-soft'}`}>{at}</span>
        {times > 1 && <span className={`ml-1 tabular text-xs font-normal ${here ? 'text-paper/80' : 'text-ink-soft'}`}>· entered {times}×</span>}
      </button>
    </li>
  );
});

/**
 * The replay's timeline: play and pause, speeds, a step either way, the readout, and the scrubber with a band per
 * stage, the reviewers' comments pinned above it and the record's own marks below; the stage list under it jumps to
 * where each stage began.
 */
export function Timeline({ index, clock, totalMs, shortened, maxGapMs, seq, playing, speed, markers, pins, marks, onToggle, onSpeed, onStep, onSeek, onSeekOffset, className = '' }: Props) {
  const track = useRef<HTMLDivElement>(null);
  const last = lastSeqOf(index);
  const at = (s: number) => `${(fractionOf(offsetOfSeq(clock, s), totalMs) * 100).toFixed(3)}%`;
  const n = shownCount(index, seq);
  const shown = n > 0 ? index.events[n - 1] : undefined;
  const current = [...markers].reverse().find((m) => m.seq <= seq);
  const listed = useMemo(() => listedMarkers(markers), [markers]);
  const readout = `seq ${seq} of ${last} · ${elapsed(realOffsetOf(index, seq))}`;

  function seekAt(clientX: number) {
    const box = track.current?.getBoundingClientRect();
    if (!box || box.width === 0) return;
    onSeekOffset(((clientX - box.left) / box.width) * totalMs);
  }

  // Two grid items of the page: the bar (controls and scrubber) stays at the top while the page scrolls; the stage
  // list and the notes under it do not.
  return (
    <>
      <section aria-labelledby="timeline-h" data-testid="timeline" className={`sticky top-0 z-20 grid gap-1 rounded-2xl border-2 border-ink bg-card px-3 py-2 shadow-md ${className}`}>
        <h2 id="timeline-h" className="sr-only">
          Timeline
        </h2>
        <div className="flex flex-wrap items-center gap-2">
          <button
            type="button"
            onClick={onToggle}
            aria-pressed={playing}
            className="inline-flex min-h-11 min-w-24 items-center justify-center gap-1 rounded-lg bg-spirit px-4 font-bold text-white hover:bg-spirit-deep"
          >
            <span aria-hidden>{playing ? '❚❚' : '▶'}</span> {playing ? 'Pause' : 'Play'}
          </button>
          <button type="button" onClick={() => onStep(-1)} aria-label="One event back" className="min-h-11 rounded-lg border-2 border-ink px-3 font-bold hover:bg-paper">
            <span aria-hidden>◀︎ 1</span>
          </button>
          <button type="button" onClick={() => onStep(1)} aria-label="One event forward" className="min-h-11 rounded-lg border-2 border-ink px-3 font-bold hover:bg-paper">
            <span aria-hidden>1 ▶︎</span>
          </button>
          <div role="group" aria-label="Speed" className="flex overflow-hidden rounded-lg border-2 border-ink">
            {SPEEDS.map((s) => (
              <button
                key={s}
                type="button"
                aria-pressed={speed === s}
                onClick={() => onSpeed(s)}
                className={`min-h-10 min-w-12 px-2 font-bold ${speed === s ? 'bg-steel text-paper' : 'bg-card hover:bg-paper'}`}
              >
                {s}×
              </button>
            ))}
          </div>
          <p className="ml-auto grid text-right leading-tight">
            <output data-testid="replay-readout" data-seq={seq} aria-live="off" className="tabular text-lg font-bold">
              {readout}
            </output>
            <span className="text-sm text-ink-soft">
              {shown ? `${clockTime(shown.serverTs)} · ${EVENT_WORDS[shown.type] ?? shown.type}` : 'before the first event'}
              {current ? ` · ${STAGE_GUIDES[current.stage].title}` : ''}
            </span>
          </p>
        </div>

        {/* Comments pinned to moments, above the track. */}
        <div className="relative h-5" aria-label="Comments on the timeline" role="group">
          {pins.map((p) => (
            <button
              key={p.seq}
              type="button"
              data-testid="timeline-pin"
              data-at-seq={p.atSeq}
              onClick={() => onSeek(p.atSeq)}
              title={`#${p.atSeq}: ${p.text}`}
              aria-label={`Comment at seq ${p.atSeq}: ${p.text}`}
              style={{ left: at(p.atSeq) }}
              className="absolute top-0 grid h-5 w-5 -translate-x-1/2 place-items-start justify-center rounded-t-md bg-bubble text-xs font-bold leading-5 text-ink shadow hover:z-10 hover:scale-110 [clip-path:polygon(0_0,100%_0,100%_70%,50%_100%,0_70%)]"
            >
              <span aria-hidden>✎</span>
            </button>
          ))}
        </div>

        <div
          ref={track}
          role="slider"
          tabIndex={0}
          aria-label="Scrubber: the moment shown"
          aria-valuemin={0}
          aria-valuemax={last}
          aria-valuenow={seq}
          aria-valuetext={`${readout}${current ? `, ${STAGE_GUIDES[current.stage].title}` : ''}`}
          data-testid="scrubber"
          onPointerDown={(e) => {
            e.currentTarget.setPointerCapture(e.pointerId);
            seekAt(e.clientX);
          }}
          onPointerMove={(e) => {
            if (e.currentTarget.hasPointerCapture(e.pointerId)) seekAt(e.clientX);
          }}
          className="relative h-11 cursor-pointer touch-none select-none overflow-hidden rounded-lg border-2 border-ink bg-paper"
        >
          <StageBands markers={markers} totalMs={totalMs} />
          <div aria-hidden className="absolute inset-y-0 left-0 bg-ink/10" style={{ width: at(seq) }} />
          <div aria-hidden className="absolute inset-y-0 w-1 -translate-x-1/2 bg-fail" style={{ left: at(seq) }} />
        </div>

        {marks.length > 0 && (
          <div className="relative h-5" aria-label="The record’s marks" role="group">
            {groupMarks(marks, (m) => fractionOf(offsetOfSeq(clock, m.seq), totalMs)).map((g) => (
              <div
                key={g[0]!.seq}
                style={{ left: at(g.at(-1)!.seq) }}
                // Near the start a group hangs to the right of its place, elsewhere to the left, so it stays on the track.
                className={`absolute top-0 flex gap-px ${fractionOf(offsetOfSeq(clock, g.at(-1)!.seq), totalMs) < 0.2 ? '' : '-translate-x-full'}`}
              >
                {g.map((m) => (
                  <button
                    key={m.seq}
                    type="button"
                    onClick={() => onSeek(m.seq)}
                    className="whitespace-nowrap rounded-b-md bg-steel px-1.5 text-xs font-semibold text-paper hover:bg-ink"
                  >
                    {MARK_WORDS[m.kind]} #{m.seq}
                  </button>
                ))}
              </div>
            ))}
          </div>
        )}
      </section>
      <div className={`grid gap-1 ${className}`}>
        <ol aria-label="Stage markers: where each stage began" className="flex flex-wrap gap-1 text-sm">
          {listed.map(({ marker: m, times }) => (
            <MarkerItem
              key={m.seq}
              marker={m}
              times={times}
              here={listed.length < markers.length ? current?.stage === m.stage : current?.seq === m.seq}
              at={elapsed(realOffsetOf(index, m.seq))}
              onSeek={onSeek}
            />
          ))}
        </ol>

        <p className="text-xs text-ink-soft">
          Keys: Space play or pause · ← → one event · Shift + ← → one stage · Home / End.
          {shortened.count > 0 &&
            ` Pauses longer than ${duration(maxGapMs)} are drawn and played as ${duration(maxGapMs)} (${shortened.count} ${shortened.count === 1 ? 'pause' : 'pauses'}, ${duration(shortened.savedMs)} left out); the readout keeps the real time.`}
        </p>
      </div>
    </>
  );
}
