import { createHash } from 'node:crypto';
import { getToken, type JWT } from 'next-auth/jwt';

/** A session lasts a working day from the moment the password was typed (the cookie's and the token's life). */
export const SESSION_MAX_AGE_SECONDS = 12 * 60 * 60;

/**
 * A short fingerprint of the user's stored password hash, carried in the session token: when the password
 * changes, the hash (and its salt) changes, and every token made before no longer matches.
 */
export function passwordStamp(passwordHash: string): string {
  return createHash('sha256').update(passwordHash).digest('base64url').slice(0, 16);
}

/**
 * The next-auth session token (decrypted, expiry checked) from a request's cookies and headers, or null. The
 * cookie's name carries `__Secure-` when next-auth set it over HTTPS; whichever is present is read.
 */
export async function readSessionToken(cookies: Record<string, string>, headers: Record<string, unknown>, secret: string): Promise<JWT | null> {
  const secureCookie = Object.keys(cookies).some((name) => name.startsWith('__Secure-next-auth.session-token'));
  return getToken({ req: { cookies, headers } as never, secret, secureCookie });
}
