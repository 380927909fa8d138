/**
 * What the sign-in form says, shared by the server (which throws these through next-auth's `?error=`) and the
 * page (which shows only texts it recognises, so a crafted link cannot put words of its own on the page).
 */

export const SIGN_IN_MISMATCH = 'That e-mail and password do not match an active account.';
export const SIGN_IN_UNAVAILABLE = 'Sign-in is not available just now; try again in a minute.';

export type SignInLock = {
  /** `account`: this e-mail from this address; `address`: every e-mail from this address. */
  scope: 'account' | 'address';
  retryAfterMs: number;
};

const LOCK_TEXT = /^Too many failed sign-ins (for this e-mail )?from your network\. Try again in \d+ minutes?\.$/;

export function lockMessage({ scope, retryAfterMs }: SignInLock): string {
  const minutes = Math.max(1, Math.ceil(retryAfterMs / 60_000));
  const who = scope === 'account' ? 'for this e-mail from your network' : 'from your network';
  return `Too many failed sign-ins ${who}. Try again in ${minutes} ${minutes === 1 ? 'minute' : 'minutes'}.`;
}

/** The text to show for next-auth's `error` (a code such as CredentialsSignin, or one of the messages above). */
export function signInErrorText(error: string | null | undefined): string | null {
  if (!error) return null;
  if (LOCK_TEXT.test(error) || error === SIGN_IN_UNAVAILABLE) return error;
  if (error === 'CredentialsSignin') return SIGN_IN_MISMATCH;
  return 'Sign-in did not go through; try again.';
}
