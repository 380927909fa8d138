import { z } from 'zod';
import { buildFootprint, LevelingError, MM_PER_IN } from '@/lib/leveling';

/** One leveling screw as the footprint editor, the machine routes and the CSV import take it. */
export const screwInput = z.strictObject({
  label: z.string().trim().min(1, 'must not be empty').max(12, 'must be at most 12 characters'),
  kind: z.enum(['corner', 'middle', 'outrigger'], { error: 'must be corner, middle or outrigger' }),
  /** mm from the table centre, +x to the operator's right. */
  xMm: z.number({ error: 'must be a number' }).finite().min(-10_000, 'must be within ±10 m').max(10_000, 'must be within ±10 m'),
  /** mm from the table centre, +y toward the back. */
  yMm: z.number({ error: 'must be a number' }).finite().min(-10_000, 'must be within ±10 m').max(10_000, 'must be within ±10 m'),
  /** The thread as given: pitch in mm, or threads per inch. */
  thread: z.strictObject({
    unit: z.enum(['mm', 'tpi'], { error: 'must be "mm" or "tpi"' }),
    value: z.number({ error: 'must be a number' }).finite().positive('must be greater than zero'),
  }),
  liftPerTurnMm: z.number({ error: 'must be a number' }).finite().positive('must be greater than zero').max(20, 'must be at most 20 mm').nullish(),
  specHeightMm: z.number({ error: 'must be a number' }).finite().min(0, 'must not be negative').max(1000, 'must be at most 1000 mm').nullish(),
});
export type ScrewInput = z.infer<typeof screwInput>;

/** Pitch in mm of a thread as given (1-8 UNC: 8 tpi = 3.175 mm; M24: 3 mm). */
export function pitchMmOf(thread: ScrewInput['thread']): number {
  return thread.unit === 'mm' ? thread.value : MM_PER_IN / thread.value;
}

/** Closest two screws may stand, centre to centre: two pads cannot share a spot. */
export const MIN_SCREW_SPACING_MM = 50;

/**
 * A footprint is possible when it has 3 to 16 screws with distinct labels, each pitch between 0.25 and 10 mm,
 * no two screws within 50 mm, and the screws not all on one line (checked by the leveling engine).
 */
export const footprintInput = z
  .array(screwInput)
  .min(3, 'needs at least 3 leveling screws')
  .max(16, 'must have at most 16 leveling screws')
  .superRefine((screws, ctx) => {
    const labels = new Map<string, number>();
    screws.forEach((s, i) => {
      const seen = labels.get(s.label.toUpperCase());
      if (seen !== undefined) ctx.addIssue({ code: 'custom', path: [i, 'label'], message: `"${s.label}" is used twice (screws ${seen + 1} and ${i + 1})` });
      labels.set(s.label.toUpperCase(), i);
      const pitch = pitchMmOf(s.thread);
      if (pitch < 0.25 || pitch > 10) ctx.addIssue({ code: 'custom', path: [i, 'thread', 'value'], message: `gives a pitch of ${pitch.toFixed(3)} mm; a leveling screw's is between 0.25 and 10 mm` });
    });
    for (let i = 0; i < screws.length; i++) {
      for (let j = i + 1; j < screws.length; j++) {
        const a = screws[i]!;
        const b = screws[j]!;
        const d = Math.hypot(a.xMm - b.xMm, a.yMm - b.yMm);
        if (d < MIN_SCREW_SPACING_MM) ctx.addIssue({ code: 'custom', path: [j, 'xMm'], message: `${b.label} is ${d.toFixed(0)} mm from ${a.label}; screws must be at least ${MIN_SCREW_SPACING_MM} mm apart` });
      }
    }
    if (ctx.value.length >= 3) {
      try {
        buildFootprint(screws.map((s) => ({ id: s.label, kind: s.kind, xMm: s.xMm, yMm: s.yMm, thread: { pitchMm: pitchMmOf(s.thread) } })));
      } catch (e) {
        if (e instanceof LevelingError) ctx.addIssue({ code: 'custom', path: [], message: e.message });
        else throw e;
      }
    }
  });

/** A starting layout for the editor: 4 corners; 6 adds a middle screw on each side; 8 adds two on each side. */
export function footprintTemplate(count: 4 | 6 | 8, spanXMm: number, spanYMm: number, thread: ScrewInput['thread'] = { unit: 'mm', value: 3 }): ScrewInput[] {
  const x = Math.round(spanXMm / 2);
  const y = Math.round(spanYMm / 2);
  const screw = (label: string, kind: ScrewInput['kind'], xMm: number, yMm: number): ScrewInput => ({ label, kind, xMm, yMm, thread, liftPerTurnMm: null, specHeightMm: null });
  const corners = [screw('FL', 'corner', -x, -y), screw('FR', 'corner', x, -y), screw('RL', 'corner', -x, y), screw('RR', 'corner', x, y)];
  if (count === 4) return corners;
  if (count === 6) return [...corners, screw('ML', 'middle', -x, 0), screw('MR', 'middle', x, 0)];
  const third = Math.round(spanYMm / 6);
  return [...corners, screw('MLF', 'middle', -x, -third), screw('MRF', 'middle', x, -third), screw('MLB', 'middle', -x, third), screw('MRB', 'middle', x, third)];
}
