import Link from 'next/link';
import type { ReactNode } from 'react';
import { MainNav } from '@/components/ui/main-nav';
import { SignOutButton } from '@/components/ui/sign-out-button';
import { Wordmark } from '@/components/ui/wordmark';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { mailboxEnabled } from '@/lib/mailbox';

export default async function AppLayout({ children }: { children: ReactNode }) {
  const actor = await requirePageActor('/');
  const links = [
    { href: '/', label: 'Start' },
    { href: '/fleet', label: 'Fleet' },
    { href: '/instruments', label: 'Instruments' },
    { href: '/visits', label: 'Visits' },
    { href: '/due', label: 'Due' },
    ...(can(actor, 'user:manage') ? [{ href: '/admin/users', label: 'Users' }] : []),
    ...(can(actor, 'mailbox:read') && mailboxEnabled() ? [{ href: '/admin/mailbox', label: 'Mailbox' }] : []),
    { href: '/settings', label: 'Settings' },
  ];
  return (
    <div className="flex min-h-dvh flex-col">
      <header className="bg-steel text-paper">
        <div className="flex items-center justify-between gap-4 px-4 py-2">
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
        </div>
        <MainNav links={links} />
      </header>
      <div className="flex-1">{children}</div>
    </div>
  );
}
