'use client';

import { useRef, useState, type PointerEvent } from 'react';
import { inputClass } from '@/components/ui/form-field';
import { displayToMm, lengthUnit, mmToDisplay, snapMm } from '@/lib/display-units';
import { footprintInput, footprintTemplate, type ScrewInput } from '@/lib/fleet/footprint';
import type { UnitSystem } from '@/lib/leveling/units';

type Props = {
  value: ScrewInput[];
  onChange?: (screws: ScrewInput[]) => void;
  tableLengthMm: number;
  tableWidthMm: number;
  unitSystem: UnitSystem;
  readOnly?: boolean;
};

const same = (v: number) => v;

const KIND_FILL: Record<ScrewInput['kind'], string> = { corner: 'var(--color-spirit)', middle: 'var(--color-bubble)', outrigger: 'var(--color-steel)' };

/** The problems of a footprint as text per screw index (-1: the footprint as a whole), from the shared schema. */
export function footprintProblems(screws: ScrewInput[]): Map<number, string[]> {
  const out = new Map<number, string[]>();
  const res = footprintInput.safeParse(screws);
  if (res.success) return out;
  for (const issue of res.error.issues) {
    const i = typeof issue.path[0] === 'number' ? issue.path[0] : -1;
    const field = issue.path.slice(1).join('.');
    out.set(i, [...(out.get(i) ?? []), field ? `${field}: ${issue.message}` : issue.message]);
  }
  return out;
}

/**
 * A machine's leveling screws drawn from above (operator at the bottom, +x right, +y toward the back) over the
 * table outline. Drag a screw or type its coordinates; start from a 4-, 6- or 8-screw layout.
 */
export function FootprintEditor({ value, onChange, tableLengthMm, tableWidthMm, unitSystem, readOnly = false }: Props) {
  const svgRef = useRef<SVGSVGElement>(null);
  const [dragging, setDragging] = useState<number | null>(null);
  const unit = lengthUnit(unitSystem);
  const problems = footprintProblems(value);
  const extent = Math.max(tableLengthMm / 2, tableWidthMm / 2, ...value.map((s) => Math.max(Math.abs(s.xMm), Math.abs(s.yMm)))) * 1.25 + 100;
  const set = (i: number, patch: Partial<ScrewInput>) => onChange?.(value.map((s, j) => (j === i ? { ...s, ...patch } : s)));

  function pointToMm(e: PointerEvent<SVGSVGElement>): { xMm: number; yMm: number } | null {
    const svg = svgRef.current;
    const ctm = svg?.getScreenCTM();
    if (!svg || !ctm) return null;
    const p = new DOMPoint(e.clientX, e.clientY).matrixTransform(ctm.inverse());
    const step = snapMm(unitSystem);
    return { xMm: Math.round(p.x / step) * step, yMm: Math.round(-p.y / step) * step };
  }

  const spanX = Math.round(Math.max(tableLengthMm * 1.5, 600));
  const spanY = Math.round(Math.max(tableWidthMm * 2.2, 600));
  const template = (n: 4 | 6 | 8) => {
    const thread = value[0]?.thread ?? { unit: unitSystem === 'inch' ? ('tpi' as const) : ('mm' as const), value: unitSystem === 'inch' ? 8 : 3 };
    onChange?.(footprintTemplate(n, spanX, spanY, thread));
  };
  const nextLabel = () => {
    for (let n = 1; ; n++) if (!value.some((s) => s.label === `S${n}`)) return `S${n}`;
  };

  return (
    <div className="grid gap-4 xl:grid-cols-[26rem_minmax(0,1fr)]">
      <figure className="grid max-w-lg content-start gap-2">
        <svg
          ref={svgRef}
          viewBox={`${-extent} ${-extent} ${2 * extent} ${2 * extent}`}
          className="aspect-square w-full touch-none rounded-xl border-2 border-ink bg-card"
          role="img"
          aria-label={`Top view of ${value.length} leveling screws`}
          onPointerMove={(e) => {
            if (dragging === null) return;
            const p = pointToMm(e);
            if (p) set(dragging, p);
          }}
          onPointerUp={() => setDragging(null)}
          onPointerLeave={() => setDragging(null)}
        >
          <line x1={-extent} x2={extent} y1={0} y2={0} stroke="var(--color-rule)" strokeWidth={extent / 300} />
          <line y1={-extent} y2={extent} x1={0} x2={0} stroke="var(--color-rule)" strokeWidth={extent / 300} />
          <rect x={-tableLengthMm / 2} y={-tableWidthMm / 2} width={tableLengthMm} height={tableWidthMm} fill="var(--color-paper)" stroke="var(--color-ink-soft)" strokeWidth={extent / 150} strokeDasharray={`${extent / 40} ${extent / 60}`} />
          <text x={0} y={0} textAnchor="middle" dominantBaseline="middle" fontSize={extent / 16} fill="var(--color-ink-soft)">
            table
          </text>
          <text x={0} y={extent * 0.93} textAnchor="middle" fontSize={extent / 14} fontWeight={700} fill="var(--color-ink)">
            ▼ front (operator)
          </text>
          {value.map((s, i) => (
            <g
              key={i}
              transform={`translate(${s.xMm} ${-s.yMm})`}
              className={readOnly ? '' : 'cursor-grab'}
              onPointerDown={(e) => {
                if (readOnly) return;
                (e.target as Element).setPointerCapture?.(e.pointerId);
                setDragging(i);
              }}
              data-screw={s.label}
            >
              <circle r={extent / 17} fill={KIND_FILL[s.kind]} stroke={problems.has(i) ? 'var(--color-fail)' : 'var(--color-ink)'} strokeWidth={extent / (problems.has(i) ? 90 : 200)} />
              <text textAnchor="middle" dominantBaseline="middle" fontSize={extent / (s.label.length > 2 ? 30 : 22)} fontWeight={700} fill="white" pointerEvents="none">
                {s.label}
              </text>
            </g>
          ))}
        </svg>
        <figcaption className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
          {(['corner', 'middle', 'outrigger'] as const).map((k) => (
            <span key={k} className="inline-flex items-center gap-1">
              <span className="inline-block size-4 rounded-full border border-ink" style={{ background: KIND_FILL[k] }} /> {k}
            </span>
          ))}
          <span className="text-ink-soft">+x to the operator&apos;s right, +y toward the back; {readOnly ? '' : `drag snaps to ${unitSystem === 'inch' ? '¼ in' : '5 mm'}`}</span>
        </figcaption>
      </figure>

      <div className="grid content-start gap-3">
        {!readOnly && (
          <div className="flex flex-wrap gap-2">
            {([4, 6, 8] as const).map((n) => (
              <button key={n} type="button" onClick={() => template(n)} className="min-h-12 rounded-lg border-2 border-ink bg-card px-4 font-semibold hover:bg-paper">
                {n}-screw layout
              </button>
            ))}
            <button
              type="button"
              onClick={() => onChange?.([...value, { label: nextLabel(), kind: 'middle', xMm: 0, yMm: 0, thread: value[0]?.thread ?? { unit: 'mm', value: 3 }, liftPerTurnMm: null, specHeightMm: null }])}
              className="min-h-12 rounded-lg border-2 border-ink bg-card px-4 font-semibold hover:bg-paper"
            >
              Add a screw
            </button>
          </div>
        )}
        {problems.get(-1)?.map((m) => (
          <p key={m} role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">
            Footprint: {m}
          </p>
        ))}
        <div className="overflow-x-auto">
          <table className="w-full text-left">
            <thead>
              <tr className="text-sm text-ink-soft">
                <th className="px-1">Label</th>
                <th className="px-1">Kind</th>
                <th className="px-1">x ({unit})</th>
                <th className="px-1">y ({unit})</th>
                <th className="px-1">Thread</th>
                <th className="px-1">Height ({unit})</th>
                {!readOnly && <th className="sr-only">Remove</th>}
              </tr>
            </thead>
            <tbody>
              {value.map((s, i) => (
                <FootprintRow key={i} index={i} screw={s} unitSystem={unitSystem} readOnly={readOnly} problems={problems.get(i)} onPatch={(p) => set(i, p)} onRemove={() => onChange?.(value.filter((_, j) => j !== i))} />
              ))}
            </tbody>
          </table>
        </div>
      </div>
    </div>
  );
}

function FootprintRow(props: { index: number; screw: ScrewInput; unitSystem: UnitSystem; readOnly: boolean; problems?: string[]; onPatch: (p: Partial<ScrewInput>) => void; onRemove: () => void }) {
  const { screw: s, unitSystem, readOnly, problems, onPatch, index } = props;
  const cell = `${inputClass} min-h-11 px-2 text-base`;
  const toShown = (mm: number) => mmToDisplay(mm, unitSystem);
  const toMm = (v: number) => displayToMm(v, unitSystem);
  return (
    <>
      <tr className="align-top">
        <td className="p-1">
          <input aria-label={`Screw ${index + 1} label`} value={s.label} readOnly={readOnly} onChange={(e) => onPatch({ label: e.target.value })} className={`${cell} w-20`} />
        </td>
        <td className="p-1">
          <select aria-label={`Screw ${index + 1} kind`} value={s.kind} disabled={readOnly} onChange={(e) => onPatch({ kind: e.target.value as ScrewInput['kind'] })} className={`${cell} w-36`}>
            <option value="corner">corner</option>
            <option value="middle">middle</option>
            <option value="outrigger">outrigger</option>
          </select>
        </td>
        {(['xMm', 'yMm'] as const).map((k) => (
          <td key={k} className="p-1">
            <NumberCell label={`Screw ${index + 1} ${k === 'xMm' ? 'x' : 'y'}`} value={s[k]} show={toShown} parse={toMm} readOnly={readOnly} onValue={(mm) => onPatch({ [k]: mm ?? Number.NaN })} className={`${cell} w-28`} />
          </td>
        ))}
        <td className="p-1">
          <span className="flex gap-1">
            <NumberCell label={`Screw ${index + 1} thread value`} value={s.thread.value} show={same} parse={same} readOnly={readOnly} onValue={(v) => onPatch({ thread: { ...s.thread, value: v ?? Number.NaN } })} className={`${cell} w-20`} />
            <select aria-label={`Screw ${index + 1} thread unit`} value={s.thread.unit} disabled={readOnly} onChange={(e) => onPatch({ thread: { ...s.thread, unit: e.target.value as 'mm' | 'tpi' } })} className={`${cell} w-28`}>
              <option value="mm">mm pitch</option>
              <option value="tpi">tpi</option>
            </select>
          </span>
        </td>
        <td className="p-1">
          <NumberCell label={`Screw ${index + 1} specified height`} value={s.specHeightMm ?? null} show={toShown} parse={toMm} readOnly={readOnly} onValue={(mm) => onPatch({ specHeightMm: mm })} className={`${cell} w-24`} />
        </td>
        {!readOnly && (
          <td className="p-1">
            <button type="button" onClick={props.onRemove} aria-label={`Remove screw ${s.label}`} className="min-h-11 rounded-lg px-3 font-bold text-fail hover:bg-fail/10">
              ✕
            </button>
          </td>
        )}
      </tr>
      {problems && (
        <tr>
          <td colSpan={7} className="px-1 pb-2">
            {problems.map((m) => (
              <p key={m} role="alert" className="text-sm font-semibold text-fail">
                {s.label || `Screw ${index + 1}`} · {m}
              </p>
            ))}
          </td>
        </tr>
      )}
    </>
  );
}

/** A number input that keeps what is being typed while the value may also change from elsewhere (a drag). */
function NumberCell({ label, value, show, parse, readOnly, onValue, className }: { label: string; value: number | null; show: (v: number) => number; parse: (typed: number) => number; readOnly: boolean; onValue: (v: number | null) => void; className: string }) {
  const shown = value === null || Number.isNaN(value) ? '' : String(show(value));
  const [typed, setTyped] = useState<string | null>(null);
  return (
    <input
      aria-label={label}
      inputMode="decimal"
      value={typed ?? shown}
      readOnly={readOnly}
      onFocus={() => setTyped(shown)}
      onBlur={() => setTyped(null)}
      onChange={(e) => {
        setTyped(e.target.value);
        const v = e.target.value.trim();
        onValue(v === '' ? null : v === '-' ? Number.NaN : parse(Number(v)));
      }}
      className={className}
    />
  );
}
