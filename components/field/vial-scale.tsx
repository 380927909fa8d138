'use client';

/**
 * A drawn vial: tap where the bubble sits. Half-division steps, ±RANGE divisions; positive is toward the
 * level's marked end, drawn on the right.
 */
const RANGE = 10;
const W = 640;
const H = 120;
const PAD = 30;
const step = (W - 2 * PAD) / (2 * RANGE);

export function VialScale({ value, onChange, label = 'Bubble position in divisions' }: { value: number | null; onChange: (divisions: number) => void; label?: string }) {
  const toX = (div: number) => W / 2 + Math.max(-RANGE, Math.min(RANGE, div)) * step;
  function pick(clientX: number, rect: DOMRect) {
    const x = ((clientX - rect.left) / rect.width) * W;
    const div = Math.round(((x - W / 2) / step) * 2) / 2;
    onChange(Math.max(-RANGE, Math.min(RANGE, div)));
  }
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      role="slider"
      aria-label={label}
      aria-valuemin={-RANGE}
      aria-valuemax={RANGE}
      aria-valuenow={value ?? 0}
      tabIndex={0}
      className="w-full cursor-pointer touch-none select-none"
      onPointerDown={(e) => pick(e.clientX, e.currentTarget.getBoundingClientRect())}
      onKeyDown={(e) => {
        if (e.key === 'ArrowRight') onChange(Math.min(RANGE, (value ?? 0) + 0.5));
        if (e.key === 'ArrowLeft') onChange(Math.max(-RANGE, (value ?? 0) - 0.5));
      }}
    >
      <rect x={PAD - 14} y={22} width={W - 2 * PAD + 28} height={56} rx={28} fill="var(--color-vial)" stroke="var(--color-ink)" strokeWidth={3} />
      {Array.from({ length: 2 * RANGE + 1 }, (_, i) => i - RANGE).map((d) => (
        <g key={d}>
          <line x1={toX(d)} x2={toX(d)} y1={d === 0 ? 18 : 28} y2={d === 0 ? 82 : d % 5 === 0 ? 72 : 62} stroke="var(--color-ink)" strokeWidth={d === 0 ? 3 : 1.5} />
          {d % 5 === 0 && (
            <text x={toX(d)} y={104} textAnchor="middle" fontSize={18} fill="var(--color-ink)" className="tabular">
              {d > 0 ? `+${d}` : d}
            </text>
          )}
        </g>
      ))}
      {value !== null && <ellipse cx={toX(value)} cy={50} rx={34} ry={20} fill="var(--color-paper)" stroke="var(--color-ink)" strokeWidth={3} opacity={0.92} />}
      <text x={W - 8} y={16} textAnchor="end" fontSize={15} fill="var(--color-ink-soft)">
        marked end ▸
      </text>
    </svg>
  );
}
