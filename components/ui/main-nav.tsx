'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';

type NavLink = { href: string; label: string };

/** The section a path belongs to: the link whose path is its longest prefix (`/` only for the start page itself). */
export function currentOf(links: NavLink[], pathname: string): string | null {
  const matches = links.filter((l) => (l.href === '/' ? pathname === '/' : pathname === l.href || pathname.startsWith(`${l.href}/`)));
  return matches.sort((a, b) => b.href.length - a.href.length)[0]?.href ?? null;
}

/** The app's main sections; the one the page belongs to is marked (aria-current) and drawn as the open tab. */
export function MainNav({ links }: { links: NavLink[] }) {
  const current = currentOf(links, usePathname());
  return (
    <nav aria-label="Main" className="flex flex-wrap gap-x-1 px-2 pb-1">
      {links.map((l) => (
        <Link
          key={l.href}
          href={l.href}
          aria-current={l.href === current ? 'page' : undefined}
          className="min-h-11 content-center rounded-lg px-3 font-semibold hover:bg-paper/15 aria-[current=page]:bg-paper aria-[current=page]:text-steel sm:px-4"
        >
          {l.label}
        </Link>
      ))}
    </nav>
  );
}
