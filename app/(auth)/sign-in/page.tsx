import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { Wordmark } from '@/components/ui/wordmark';
import { getActor } from '@/lib/auth/session';
import { signInErrorText } from '@/lib/auth/sign-in-messages';
import { SignInForm } from './sign-in-form';

export const metadata: Metadata = { title: 'Sign in' };

function safeReturn(url: string | undefined): string {
  return url && url.startsWith('/') && !url.startsWith('//') ? url : '/';
}

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ callbackUrl?: string; error?: string }> }) {
  const { callbackUrl, error } = await searchParams;
  const returnTo = safeReturn(callbackUrl);
  if (await getActor()) redirect(returnTo);
  return (
    <main className="grid min-h-dvh place-items-center bg-steel p-4">
      <div className="w-full max-w-md rounded-2xl bg-paper p-8 shadow-2xl">
        <Wordmark className="text-3xl text-spirit" />
        <p className="mt-2 text-ink-soft">Level the machine together. Keep the record.</p>
        <SignInForm returnTo={returnTo} initialError={signInErrorText(error)} />
      </div>
    </main>
  );
}
