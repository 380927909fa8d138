'use client';

import { useEffect, useRef } from 'react';
import type { Verdict } from '@/lib/session/derive';
import { SESSION_STAGES, STAGE_GUIDES, type SessionStage } from '@/lib/session/stages';

const mark: Record<Verdict['status'], { sign: string; cls: string; word: string }> = {
  pass: { sign: '✓', cls: 'bg-pass text-white', word: 'passes' },
  fail: { sign: '✕', cls: 'bg-fail text-white', word: 'fails' },
  incomplete: { sign: '○', cls: 'bg-rule text-ink', word: 'incomplete' },
};

type Props = { current: SessionStage; verdicts: Record<SessionStage, Verdict>; onBack: (stage: SessionStage) => void; disabled: boolean };

/** The stages in order with each one's verdict; an earlier stage can be entered again from here. */
export function StageStepper({ current, verdicts, onBack, disabled }: Props) {
  const at = SESSION_STAGES.indexOf(current);
  const list = useRef<HTMLOListElement>(null);
  useEffect(() => {
    list.current?.querySelector('[aria-current="step"]')?.scrollIntoView({ block: 'nearest', inline: 'center' });
  }, [current]);
  return (
    <nav aria-label="Stages" className="-mx-1 overflow-x-auto pb-1">
      <ol ref={list} className="flex gap-1 px-1">
        {SESSION_STAGES.map((s, i) => {
          const v = mark[verdicts[s].status];
          const isCurrent = s === current;
          const earlier = i < at;
          return (
            <li key={s} className="shrink-0">
              <button
                type="button"
                data-testid="stage-step"
                data-stage={s}
                data-status={verdicts[s].status}
                aria-current={isCurrent ? 'step' : undefined}
                disabled={disabled || !earlier}
                onClick={() => onBack(s)}
                aria-label={`${i + 1} ${STAGE_GUIDES[s].title}, ${v.word}${earlier ? ', go back to it' : ''}`}
                className={`flex min-h-12 items-center gap-2 rounded-lg border-2 px-2 text-left text-sm font-semibold ${
                  isCurrent ? 'border-ink bg-steel text-paper' : earlier ? 'border-ink bg-card' : 'border-rule bg-card text-ink-soft'
                } disabled:cursor-default`}
              >
                <span aria-hidden className={`grid h-7 w-7 place-items-center rounded-full text-sm font-bold ${v.cls}`}>
                  {v.sign}
                </span>
                <span className="max-w-24 leading-tight">
                  <span className="tabular">{i + 1}</span> {STAGE_GUIDES[s].title}
                </span>
              </button>
            </li>
          );
        })}
      </ol>
    </nav>
  );
}
