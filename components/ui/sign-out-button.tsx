'use client';

import { useState } from 'react';

/**
 * Signs out through next-auth's own endpoints (CSRF token, then POST), without loading next-auth's client
 * library on every page.
 */
export function SignOutButton() {
  const [busy, setBusy] = useState(false);
  async function signOut() {
    setBusy(true);
    // What this device keeps for working without a network (loaded only now, not with every page).
    const local = await import('@/components/session/outbox').catch(() => null);
    const me = local ? await fetch('/api/me').then((r) => (r.ok ? (r.json() as Promise<{ me: { id: string } }>) : null)).catch(() => null) : null;
    const waiting = local && me ? await local.pendingFor(me.me.id).catch(() => 0) : 0;
    if (waiting > 0 && !window.confirm(`${waiting} ${waiting === 1 ? 'entry has' : 'entries have'} not reached the server yet. They stay on this device and go out when you sign in here again. Sign out anyway?`)) {
      setBusy(false);
      return;
    }
    try {
      const { csrfToken } = (await fetch('/api/auth/csrf').then((r) => r.json())) as { csrfToken: string };
      await fetch('/api/auth/signout', { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: new URLSearchParams({ csrfToken, json: 'true' }) });
    } catch {
      setBusy(false);
      window.alert('No connection to the server: sign out once the connection is back.');
      return;
    }
    await local?.forgetLocalCopies().catch(() => undefined);
    window.location.assign('/sign-in');
  }
  return (
    <button
      type="button"
      onClick={() => void signOut()}
      disabled={busy}
      className="min-h-12 rounded-lg border-2 border-paper/60 px-4 font-semibold hover:bg-paper hover:text-steel"
    >
      Sign out
    </button>
  );
}
