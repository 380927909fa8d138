'use client';

import { useState, type FormEvent, type ReactNode } from 'react';
import { formatPosition } from '@/lib/display-units';
import type { UnitSystem } from '@/lib/leveling/units';
import type { ReadingInput } from '@/lib/session/commands';
import type { PlannedReading } from '@/lib/session/derive';
import type { SessionScrew } from '@/lib/session/events';
import type { SessionStage } from '@/lib/session/stages';
import { Button } from '@/components/ui/button';
import { checkCommand, type Checked } from './command-schemas';
import { entryUnits, fieldError, heightToMm, indicatorToUm, typedNumber } from './field-logic';
import { NumberField } from './number-field';
import { VialScale } from './vial-scale';

type Props = {
  target: PlannedReading;
  stage: SessionStage;
  unitSystem: UnitSystem;
  screws: SessionScrew[];
  /** Queues the reading; resolves once it is safely in the outbox. */
  onRecord: (reading: ReadingInput) => Promise<void>;
};

type Problem = { field: string | null; message: string };

/** The entry form for one reading: tap the drawn vial or type divisions; heights and indicator values typed. */
export function ReadingEntry({ target, stage, unitSystem, screws, onRecord }: Props) {
  const [problem, setProblem] = useState<Problem | null>(null);
  const [busy, setBusy] = useState(false);
  const [values, setValues] = useState<Record<string, string>>({});
  const [vials, setVials] = useState<Record<string, number | null>>({});
  const units = entryUnits(unitSystem);
  const text = (name: string) => values[name] ?? '';
  const set = (name: string) => (t: string) => setValues((v) => ({ ...v, [name]: t }));
  /** A divisions field: what was typed wins over the tapped vial. */
  const divisions = (name: string): number | null => typedNumber(text(name)) ?? vials[name] ?? null;
  const shownOnVial = (name: string) => {
    const t = typedNumber(text(name));
    return t !== null && Number.isFinite(t) ? t : (vials[name] ?? null);
  };

  async function check<T>(checking: Promise<Checked<T>>): Promise<T | null> {
    const parsed = await checking;
    if (parsed.success) return parsed.data;
    setProblem(fieldError(parsed.error));
    return null;
  }

  async function build(): Promise<ReadingInput | null> {
    switch (target.kind) {
      case 'level': {
        const d = divisions('divisions');
        if (d === null) {
          setProblem({ field: 'divisions', message: 'divisions: tap the vial or type where the bubble sits' });
          return null;
        }
        return check(checkCommand('levelReadingInput', { kind: 'level', stage, axis: target.axis, positionMm: target.positionMm, divisions: d }));
      }
      case 'reversal': {
        const first = divisions('firstDiv');
        const second = divisions('secondDiv');
        if (first === null || second === null) {
          const field = first === null ? 'firstDiv' : 'secondDiv';
          setProblem({ field, message: `${field}: tap the vial or type where the bubble sits` });
          return null;
        }
        return check(checkCommand('reversalReadingInput', { kind: 'reversal', stage, axis: target.axis, firstDiv: first, secondDiv: second }));
      }
      case 'height': {
        const h = typedNumber(text('height'));
        if (h === null) {
          setProblem({ field: 'height', message: `height: type the height in ${units.height}` });
          return null;
        }
        return check(checkCommand('heightReadingInput', { kind: 'height', stage, screwId: target.screwId, heightMm: heightToMm(h, unitSystem) }));
      }
      case 'sweep': {
        const sides = ['front', 'back', 'left', 'right'] as const;
        const missing = sides.find((s) => typedNumber(text(s)) === null);
        if (missing) {
          setProblem({ field: missing, message: `${missing}: type the indicator value in ${units.indicator}` });
          return null;
        }
        const um = (s: (typeof sides)[number]) => indicatorToUm(typedNumber(text(s))!, unitSystem);
        return check(
          checkCommand('sweepReadingInput', {
            kind: 'sweep',
            stage,
            diameterMm: target.diameterMm,
            frontUm: um('front'),
            backUm: um('back'),
            leftUm: um('left'),
            rightUm: um('right'),
          }),
        );
      }
    }
  }

  async function submit(e: FormEvent) {
    e.preventDefault();
    setProblem(null);
    setBusy(true);
    try {
      const reading = await build();
      if (!reading) return;
      await onRecord(reading);
      setValues({});
      setVials({});
    } catch {
      setProblem({ field: null, message: 'This browser could not keep the reading (storage refused); nothing was queued.' });
    } finally {
      setBusy(false);
    }
  }

  const invalid = (name: string) => problem?.field === name;
  const vial = (name: string, prompt: ReactNode, typedLabel: string) => (
    <div className="grid gap-2">
      <p className="font-semibold">{prompt}</p>
      <VialScale value={shownOnVial(name)} onChange={(d) => { setVials((v) => ({ ...v, [name]: d })); set(name)(''); }} label={`Tap the bubble (${name})`} />
      <NumberField name={name} label={typedLabel} value={text(name)} onChange={set(name)} unit="div" placeholder={vials[name] != null ? String(vials[name]) : 'e.g. +1.5'} invalid={invalid(name)} signed />
    </div>
  );

  const screwLabel = target.kind === 'height' ? (screws.find((s) => s.id === target.screwId)?.label ?? 'the screw') : '';
  return (
    <form onSubmit={submit} noValidate className="grid gap-4 rounded-xl border-2 border-steel bg-paper p-3" aria-label={`Enter ${target.label}`}>
      <p className="text-lg font-bold">
        {target.label}
        {target.kind === 'level' && <span className="ml-2 font-normal tabular text-ink-soft">at {formatPosition(target.positionMm, unitSystem)} along Y</span>}
      </p>
      {target.kind === 'level' && vial('divisions', <>Tap where the bubble sits (marked end {target.axis === 'x' ? 'to the right' : 'to the back'})</>, 'or type divisions')}
      {target.kind === 'reversal' && (
        <>
          {vial('firstDiv', '1 · First reading, marked end to the right', 'First reading')}
          {vial('secondDiv', '2 · Turned 180° on the same spot', 'Turned 180°')}
        </>
      )}
      {target.kind === 'height' && (
        <NumberField name="height" label={`Height of the base at ${screwLabel}`} value={text('height')} onChange={set('height')} unit={units.height} invalid={invalid('height')} />
      )}
      {target.kind === 'sweep' && (
        <div className="grid gap-3">
          <p className="text-sm text-ink-soft">
            Indicator values in {unitSystem === 'inch' ? 'inches (0.0001 in is one tenth)' : 'µm'}; + = tip pushed in. Zero at the left point.
          </p>
          <div className="grid gap-3 sm:grid-cols-2">
            {(['left', 'front', 'right', 'back'] as const).map((s) => (
              <NumberField key={s} name={s} label={s[0]!.toUpperCase() + s.slice(1)} value={text(s)} onChange={set(s)} unit={units.indicator} invalid={invalid(s)} signed />
            ))}
          </div>
        </div>
      )}
      {problem && (
        <p role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">
          {problem.message}
        </p>
      )}
      <Button type="submit" disabled={busy} className="min-h-16 text-xl">
        {busy ? 'Keeping it…' : 'Record reading'}
      </Button>
    </form>
  );
}
