'use client';

import { useSyncExternalStore } from 'react';

const never = () => () => undefined;

/**
 * A time in the viewer's own time zone. The server does not know that zone, so the server's HTML and the first
 * render in the browser show UTC (named as such); once hydrated, the browser renders it again in its own zone.
 * (React keeps the server's text on a hydration mismatch, so formatting in the browser during hydration would leave
 * the UTC text in place.)
 */
export function LocalTime({ iso, withZone = true }: { iso: string; withZone?: boolean }) {
  const hydrated = useSyncExternalStore(never, () => true, () => false);
  const text = new Date(iso).toLocaleString('en-GB', {
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    ...(withZone ? { timeZoneName: 'short' } : {}),
    ...(hydrated ? {} : { timeZone: 'UTC' }),
  });
  return (
    <time dateTime={iso} className="tabular">
      {text}
    </time>
  );
}
