'use client';

import { signIn } from 'next-auth/react';
import { useRouter } from 'next/navigation';
import { useState, type FormEvent } from 'react';
import { Button } from '@/components/ui/button';
import { signInErrorText } from '@/lib/auth/sign-in-messages';

/** `initialError`: next-auth's `?error=` when it sent the browser here itself. */
export function SignInForm({ returnTo, initialError }: { returnTo: string; initialError?: string | null }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(initialError ?? null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setBusy(true);
    setError(null);
    const res = await signIn('credentials', { email: form.get('email'), password: form.get('password'), redirect: false });
    setBusy(false);
    if (!res || res.error) {
      // A lock says when to try again; any other refusal gets the one wording that does not tell which part was wrong.
      setError(signInErrorText(res?.error ?? 'CredentialsSignin'));
      return;
    }
    router.replace(returnTo);
    router.refresh();
  }

  return (
    <form onSubmit={onSubmit} className="mt-6 grid gap-4" noValidate>
      <label className="grid gap-1 font-semibold">
        E-mail
        <input name="email" type="email" autoComplete="username" required className="min-h-12 rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal" />
      </label>
      <label className="grid gap-1 font-semibold">
        Password
        <input name="password" type="password" autoComplete="current-password" required className="min-h-12 rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal" />
      </label>
      {error && (
        <p role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">
          {error}
        </p>
      )}
      <Button type="submit" disabled={busy}>
        {busy ? 'Signing in…' : 'Sign in'}
      </Button>
    </form>
  );
}
