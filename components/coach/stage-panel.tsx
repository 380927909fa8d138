import type { Verdict } from '@/lib/session/derive';
import type { SessionState } from '@/lib/session/fold';
import { SESSION_STAGES, STAGE_GUIDES } from '@/lib/session/stages';
import { CautionList } from '@/components/session/caution-list';
import { clock } from './format';

const VERDICT_LOOK: Record<Verdict['status'], { text: string; cls: string }> = {
  pass: { text: 'Within tolerance', cls: 'bg-pass text-white' },
  fail: { text: 'Outside tolerance', cls: 'bg-fail text-white' },
  incomplete: { text: 'Readings to take', cls: 'bg-rule text-ink' },
};

/** The latest stage entries listed (a long session enters stages thousands of times). */
const STAGE_LOG_SHOWN = 30;

/** The stage the technician is in, its verdict with the detail, where the level goes, and the stage log. */
export function StagePanel({ state, verdict }: { state: SessionState; verdict: Verdict }) {
  const guide = STAGE_GUIDES[state.stage];
  const n = SESSION_STAGES.indexOf(state.stage) + 1;
  const look = VERDICT_LOOK[verdict.status];
  return (
    <section aria-labelledby="stage-h" data-testid="coach-stage" data-stage={state.stage} data-verdict={verdict.status} className="grid gap-2 rounded-2xl border-2 border-ink bg-card p-3">
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <p className="text-xs font-semibold uppercase tracking-wide text-ink-soft">
            Stage {n} of {SESSION_STAGES.length}
          </p>
          <h2 id="stage-h" className="text-xl font-bold">
            {guide.title}
          </h2>
        </div>
        <span className={`rounded-full px-3 py-1 text-sm font-bold ${look.cls}`}>{look.text}</span>
      </div>
      {verdict.detail.length > 0 && (
        <ul className="list-disc pl-5 text-sm">
          {verdict.detail.slice(0, 8).map((d) => (
            <li key={d}>{d}</li>
          ))}
          {verdict.detail.length > 8 && <li>and {verdict.detail.length - 8} more</li>}
        </ul>
      )}
      <p className="text-sm text-ink-soft">
        <b className="text-ink">Where:</b> {guide.placement}
      </p>
      <details className="text-sm">
        <summary className="cursor-pointer font-semibold">Stage log ({state.stageLog.length})</summary>
        <ol className="mt-1 grid gap-0.5">
          {state.stageLog.length > STAGE_LOG_SHOWN && (
            <li className="text-ink-soft">{state.stageLog.length - STAGE_LOG_SHOWN} earlier entries not listed</li>
          )}
          {state.stageLog.slice(-STAGE_LOG_SHOWN).map((s) => (
            <li key={s.seq} className="flex justify-between gap-2 tabular">
              <span className="font-sans">{STAGE_GUIDES[s.stage].title}</span>
              <span>
                {clock(s.at)} · #{s.seq}
              </span>
            </li>
          ))}
        </ol>
      </details>
    </section>
  );
}

/** The standing cautions, with the stage's own above them; compact, always shown. */
export function CoachCautions({ stageCautions }: { stageCautions: readonly string[] }) {
  return (
    <aside role="note" aria-label="Safety" className="rounded-lg border-l-8 border-bubble bg-bubble/10 p-2 text-sm leading-snug">
      <p className="font-bold">Several tonnes rest on these screws. Before advising a move:</p>
      <CautionList cautions={stageCautions} className="mt-1 list-disc pl-5" />
    </aside>
  );
}
