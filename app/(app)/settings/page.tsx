import type { Metadata } from 'next';
import { UnitSwitch } from '@/components/fleet/unit-switch';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Settings' };

export default async function SettingsPage() {
  const actor = await requirePageActor('/settings');
  return (
    <main className="mx-auto grid max-w-3xl grid-cols-[minmax(0,1fr)] gap-6 p-4 sm:p-6">
      <h1 className="text-2xl font-bold">Settings</h1>
      <p>
        Signed in as <span className="font-semibold">{actor.name}</span> ({actor.role}).
      </p>
      <UnitSwitch current={actor.unitSystem} />
    </main>
  );
}
