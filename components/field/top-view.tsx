import { useId } from 'react';
import type { SessionScrew } from '@/lib/session/events';
import type { Placement } from './field-logic';

type Props = {
  /** Smaller, for the move card. */
  compact?: boolean;
  screws: SessionScrew[];
  tableMm: { lengthMm: number; widthMm: number } | null;
  travelYMm: number | null;
  placement: Placement;
  /** Screws with a move waiting for the technician. */
  movingScrewIds: ReadonlySet<string>;
};

/** Length of the drawn level, mm: about a 200 mm precision level. */
const LEVEL_MM = 200;

/**
 * The table from above: the leveling screws, the table at mid-travel, the stations along Y, and where the level
 * (a bar with its marked end) or the indicator circle goes. Drawn with the back at the top and the operator's
 * side at the bottom; +x to the operator's right.
 */
export function TopView({ compact = false, screws, tableMm, travelYMm, placement, movingScrewIds }: Props) {
  const halfX = Math.max(300, ...screws.map((s) => Math.abs(s.xMm)), (tableMm?.lengthMm ?? 0) / 2);
  const halfY = Math.max(250, ...screws.map((s) => Math.abs(s.yMm)), (travelYMm ?? 0) / 2 + (tableMm?.widthMm ?? 0) / 2);
  const arrowId = `lw-arrow-${useId().replace(/[^a-zA-Z0-9_-]/g, '')}`;
  const u = Math.max(halfX, halfY) / 40; // one drawing unit: text, marks and margins scale with the machine
  const levelLen = Math.max(LEVEL_MM, halfX * 0.35);
  // SVG y grows downward; the back (+y) is drawn at the top.
  const Y = (yMm: number) => -yMm;
  const stationsY = travelYMm ? [-travelYMm / 2, 0, travelYMm / 2] : [];
  const left = -(halfX + 11 * u);
  const top = -(halfY + 17 * u);

  return (
    <figure className="grid gap-1">
      <svg
        viewBox={`${left} ${top} ${-2 * left} ${-2 * top}`}
        role="img"
        aria-label="Top view of the table: back at the top, operator's side at the bottom"
        className={`w-full rounded-xl border-2 border-ink bg-card ${compact ? 'max-h-[28vh]' : 'max-h-[46vh]'}`}
      >
        <text x={0} y={top + 6.5 * u} textAnchor="middle" fontSize={4.5 * u} fontWeight={700} fill="var(--color-ink-soft)">
          BACK
        </text>
        <text x={0} y={-top - 3 * u} textAnchor="middle" fontSize={4.5 * u} fontWeight={700} fill="var(--color-ink)">
          FRONT (operator)
        </text>
        {/* Base outline through the screws. */}
        <rect x={-halfX - 6 * u} y={-halfY - 6 * u} width={2 * halfX + 12 * u} height={2 * halfY + 12 * u} rx={2 * u} fill="none" stroke="var(--color-rule)" strokeWidth={0.8 * u} />
        {travelYMm !== null && (
          <line x1={0} x2={0} y1={Y(travelYMm / 2)} y2={Y(-travelYMm / 2)} stroke="var(--color-ink-soft)" strokeWidth={0.5 * u} strokeDasharray={`${2 * u} ${1.5 * u}`} />
        )}
        {tableMm && (
          <rect x={-tableMm.lengthMm / 2} y={-tableMm.widthMm / 2} width={tableMm.lengthMm} height={tableMm.widthMm} fill="var(--color-paper)" stroke="var(--color-ink)" strokeWidth={0.6 * u} />
        )}
        {stationsY.map((y) => (
          <line key={y} x1={-3 * u} x2={3 * u} y1={Y(y)} y2={Y(y)} stroke="var(--color-ink-soft)" strokeWidth={0.6 * u} />
        ))}
        {/* Axis arrows, in the bottom margin right of centre. */}
        <g transform={`translate(${halfX * 0.6} ${-top - 4 * u})`} fontSize={3.6 * u} fill="var(--color-ink)">
          <line x1={0} y1={0} x2={8 * u} y2={0} stroke="var(--color-ink)" strokeWidth={0.6 * u} markerEnd={`url(#${arrowId})`} />
          <line x1={0} y1={0} x2={0} y2={-8 * u} stroke="var(--color-ink)" strokeWidth={0.6 * u} markerEnd={`url(#${arrowId})`} />
          <text x={9.5 * u} y={1.3 * u}>+X</text>
          <text x={1.5 * u} y={-7 * u}>+Y</text>
        </g>
        <defs>
          <marker id={arrowId} viewBox="0 0 10 10" refX="8" refY="5" markerWidth="5" markerHeight="5" orient="auto-start-reverse">
            <path d="M0 0 L10 5 L0 10 z" fill="var(--color-ink)" />
          </marker>
        </defs>

        {placement?.kind === 'circle' && (
          <g>
            <circle cx={placement.xMm} cy={Y(placement.yMm)} r={placement.diameterMm / 2} fill="none" stroke="var(--color-spirit)" strokeWidth={1 * u} strokeDasharray={`${2.5 * u} ${1.2 * u}`} />
            {(
              [
                ['F', 0, -1],
                ['B', 0, 1],
                ['L', -1, 0],
                ['R', 1, 0],
              ] as const
            ).map(([label, dx, dy]) => {
              const r = placement.diameterMm / 2;
              return (
                <g key={label}>
                  <circle cx={placement.xMm + dx * r} cy={Y(placement.yMm + dy * r)} r={2.4 * u} fill="var(--color-spirit)" />
                  <text x={placement.xMm + dx * (r + 6 * u)} y={Y(placement.yMm + dy * (r + 6 * u)) + 1.5 * u} textAnchor="middle" fontSize={4 * u} fontWeight={700} fill="var(--color-spirit-deep)">
                    {label}
                  </text>
                </g>
              );
            })}
          </g>
        )}
        {placement?.kind === 'bar' && (
          <g data-testid="level-placement" data-axis={placement.axis} data-y-mm={placement.yMm}>
            {placement.axis === 'x' ? (
              <>
                <rect x={placement.xMm - levelLen / 2} y={Y(placement.yMm) - 2.6 * u} width={levelLen} height={5.2 * u} rx={1.2 * u} fill="var(--color-vial)" stroke="var(--color-ink)" strokeWidth={0.7 * u} />
                <path d={`M${placement.xMm + levelLen / 2 + 1 * u} ${Y(placement.yMm) - 3.5 * u} l${4.5 * u} ${3.5 * u} l${-4.5 * u} ${3.5 * u} z`} fill="var(--color-ink)" />
              </>
            ) : (
              <>
                <rect x={placement.xMm - 2.6 * u} y={Y(placement.yMm) - levelLen / 2} width={5.2 * u} height={levelLen} rx={1.2 * u} fill="var(--color-vial)" stroke="var(--color-ink)" strokeWidth={0.7 * u} />
                <path d={`M${placement.xMm - 3.5 * u} ${Y(placement.yMm) - levelLen / 2 - 1 * u} l${3.5 * u} ${-4.5 * u} l${3.5 * u} ${4.5 * u} z`} fill="var(--color-ink)" />
              </>
            )}
          </g>
        )}

        {screws.map((s) => {
          const moving = movingScrewIds.has(s.id);
          const measuring = placement?.kind === 'screw' && placement.screwId === s.id;
          const hot = moving || measuring;
          return (
            <g key={s.id} data-screw={s.label} data-highlight={hot ? 'true' : 'false'}>
              {hot && <circle cx={s.xMm} cy={Y(s.yMm)} r={9 * u} fill="var(--color-bubble)" opacity={0.35} />}
              <circle cx={s.xMm} cy={Y(s.yMm)} r={4.2 * u} fill={hot ? 'var(--color-bubble)' : s.kind === 'middle' ? 'var(--color-card)' : 'var(--color-steel)'} stroke="var(--color-ink)" strokeWidth={0.8 * u} />
              <text x={s.xMm + (s.xMm >= 0 ? -6 * u : 6 * u)} y={Y(s.yMm) + (s.yMm >= 0 ? 9.5 * u : -6 * u)} textAnchor={s.xMm >= 0 ? 'end' : 'start'} fontSize={4.6 * u} fontWeight={700} fill="var(--color-ink)">
                {s.label}
              </text>
            </g>
          );
        })}
      </svg>
      <figcaption className={compact ? 'sr-only' : 'text-sm text-ink-soft'}>
        Seen from above: back at the top, operator&apos;s side at the bottom, +X to the right. Green bar = the level, ▸ = its marked end; amber = the screw to turn or measure.
      </figcaption>
    </figure>
  );
}
