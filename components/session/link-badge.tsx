import type { Link } from './use-live-session';

const look: Record<Link, { text: string; cls: string }> = {
  connecting: { text: 'Connecting…', cls: 'bg-rule text-ink' },
  live: { text: 'Live', cls: 'bg-pass text-white' },
  offline: { text: 'Offline', cls: 'bg-fail text-white' },
};

/** The connection to the session, always in view. */
export function LinkBadge({ link }: { link: Link }) {
  return (
    <span role="status" data-link={link} className={`rounded-full px-4 py-2 text-base font-bold ${look[link].cls}`}>
      {look[link].text}
    </span>
  );
}
