import Link from 'next/link';
import type { ReactNode } from 'react';
import { SignOutButton } from '@/components/ui/sign-out-button';
import { Wordmark } from '@/components/ui/wordmark';
import { requirePageActor } from '@/lib/auth/session';

export default async function AppLayout({ children }: { children: ReactNode }) {
  const actor = await requirePageActor('/');
  return (
    <div className="flex min-h-dvh flex-col">
      <header className="flex items-center justify-between gap-4 bg-steel px-4 py-2 text-paper">
        <Link href="/" className="min-h-12 content-center">
          <Wordmark className="text-xl" />
        </Link>
        <div className="flex items-center gap-3">
          <span className="hidden text-right leading-tight sm:block">
            <span className="block font-semibold">{actor.name}</span>
            <span className="block text-sm text-vial">{actor.role}</span>
          </span>
          <SignOutButton />
        </div>
      </header>
      <div className="flex-1">{children}</div>
    </div>
  );
}
