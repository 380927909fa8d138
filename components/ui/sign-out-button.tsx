'use client';

import { signOut } from 'next-auth/react';

export function SignOutButton() {
  return (
    <button
      type="button"
      onClick={() => void signOut({ callbackUrl: '/sign-in' })}
      className="min-h-12 rounded-lg border-2 border-paper/60 px-4 font-semibold hover:bg-paper hover:text-steel"
    >
      Sign out
    </button>
  );
}
