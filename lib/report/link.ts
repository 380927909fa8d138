/**
 * The signed read-only link to a session's report: a token carrying the session id, the expiry and the units of
 * the figures, signed with HMAC-SHA-256 under a key derived from the app's secret (NEXTAUTH_SECRET). Nothing is
 * stored: the signature is the proof. Pure apart from the secret passed in; time is passed in.
 *
 * Token: `<payload>.<signature>`, both base64url without padding; payload = JSON `{ s, e, u }` (session id, expiry
 * in Unix seconds, units). The signature covers the payload's characters as sent, and is compared as text, so a
 * changed character anywhere is refused (base64url's spare low bits cannot hide a change).
 */
import { createHmac, timingSafeEqual } from 'node:crypto';
import { z } from 'zod';

/** Days a report link works when nothing else is said: REPORT_LINK_DAYS, else 14. */
export const DEFAULT_REPORT_LINK_DAYS = 14;

/** The link's life in days from the environment (REPORT_LINK_DAYS, a whole number 1 to 365), else 14. */
export function reportLinkDays(source: Record<string, string | undefined> = process.env): number {
  const parsed = z.coerce.number().int().min(1).max(365).safeParse(source.REPORT_LINK_DAYS);
  if (source.REPORT_LINK_DAYS === undefined || source.REPORT_LINK_DAYS === '') return DEFAULT_REPORT_LINK_DAYS;
  if (!parsed.success) throw new Error('Environment variable REPORT_LINK_DAYS: must be a whole number of days from 1 to 365');
  return parsed.data;
}

export type ReportLinkClaims = { sessionId: string; expiresAt: Date; units: 'inch' | 'metric' };

const payloadSchema = z.strictObject({ s: z.uuid(), e: z.number().int().positive(), u: z.enum(['inch', 'metric']) });

/** The signing key: the app's secret, narrowed to this one use so a report token proves nothing elsewhere. */
function keyOf(secret: string): Buffer {
  return createHmac('sha256', secret).update('levelwire:report-link:v1').digest();
}

function sign(payload: string, secret: string): string {
  return createHmac('sha256', keyOf(secret)).update(payload).digest('base64url');
}

/** A token for `claims`, signed with `secret`. */
export function signReportLink(claims: ReportLinkClaims, secret: string): string {
  const body = { s: claims.sessionId, e: Math.floor(claims.expiresAt.getTime() / 1000), u: claims.units };
  const payload = Buffer.from(JSON.stringify(body)).toString('base64url');
  return `${payload}.${sign(payload, secret)}`;
}

export type ReportLinkCheck =
  | { ok: true; claims: ReportLinkClaims }
  | { ok: false; problem: 'malformed' | 'bad-signature' }
  | { ok: false; problem: 'expired'; expiredAt: Date };

/** Checks a token: its shape, then its signature, then its expiry at `now` (an expired but genuine token says when). */
export function verifyReportLink(token: string, secret: string, now: Date): ReportLinkCheck {
  const parts = token.split('.');
  if (parts.length !== 2 || !/^[A-Za-z0-9_-]+$/.test(parts[0]!) || !/^[A-Za-z0-9_-]{43}$/.test(parts[1]!)) return { ok: false, problem: 'malformed' };
  const [payload, signature] = parts as [string, string];
  const expected = Buffer.from(sign(payload, secret));
  if (!timingSafeEqual(expected, Buffer.from(signature))) return { ok: false, problem: 'bad-signature' };
  let body: z.output<typeof payloadSchema>;
  try {
    body = payloadSchema.parse(JSON.parse(Buffer.from(payload, 'base64url').toString('utf8')));
  } catch {
    return { ok: false, problem: 'malformed' };
  }
  const expiresAt = new Date(body.e * 1000);
  if (now.getTime() >= expiresAt.getTime()) return { ok: false, problem: 'expired', expiredAt: expiresAt };
  return { ok: true, claims: { sessionId: body.s, expiresAt, units: body.u } };
}
