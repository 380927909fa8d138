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
    const { csrfToken } = (await fetch('/api/auth/csrf').then((r) => r.json())) as { csrfToken: string };
    await fetch('/api/auth/signout', { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: new URLSearchParams({ csrfToken, json: 'true' }) });
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
