'use client';

/** A time in the viewer's own time zone (the server renders UTC; the browser corrects it on hydration). */
export function LocalTime({ iso, withZone = true }: { iso: string; withZone?: boolean }) {
  const text = new Date(iso).toLocaleString('en-GB', {
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    ...(withZone ? { timeZoneName: 'short' } : {}),
  });
  return (
    <time dateTime={iso} suppressHydrationWarning className="tabular">
      {text}
    </time>
  );
}
