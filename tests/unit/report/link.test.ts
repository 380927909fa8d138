import { describe, expect, it } from 'vitest';
import { DEFAULT_REPORT_LINK_DAYS, reportLinkDays, signReportLink, verifyReportLink } from '@/lib/report/link';

const SECRET = 'unit-test-secret-of-some-length';
const sessionId = '7d7c2f44-3a0e-4a77-9d7c-4f2b1f0b9a11';
const now = new Date('2026-03-03T12:00:00Z');
const inDays = (d: number) => new Date(now.getTime() + d * 86_400_000);

describe('report links', () => {
  it('verifies its own token before expiry, with the claims it was made with (to the second)', () => {
    const token = signReportLink({ sessionId, expiresAt: inDays(14), units: 'inch' }, SECRET);
    expect(verifyReportLink(token, SECRET, now)).toEqual({ ok: true, claims: { sessionId, expiresAt: inDays(14), units: 'inch' } });
    expect(verifyReportLink(token, SECRET, inDays(13.99))).toMatchObject({ ok: true });
  });

  it('refuses it from the moment of expiry, saying when it expired', () => {
    const token = signReportLink({ sessionId, expiresAt: inDays(14), units: 'metric' }, SECRET);
    expect(verifyReportLink(token, SECRET, inDays(14))).toEqual({ ok: false, problem: 'expired', expiredAt: inDays(14) });
    const past = signReportLink({ sessionId, expiresAt: inDays(-1), units: 'metric' }, SECRET);
    expect(verifyReportLink(past, SECRET, now)).toMatchObject({ ok: false, problem: 'expired' });
  });

  it('refuses a token with any one character changed, wherever it is (payload, dot or signature)', () => {
    const token = signReportLink({ sessionId, expiresAt: inDays(14), units: 'metric' }, SECRET);
    const alphabet = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_';
    for (let i = 0; i < token.length; i++) {
      // Two substitutes per position: the next character of the alphabet and the one after it.
      for (const step of [1, 2]) {
        const at = alphabet.indexOf(token[i]!);
        const sub = at < 0 ? 'A' : alphabet[(at + step) % alphabet.length]!;
        const changed = token.slice(0, i) + sub + token.slice(i + 1);
        const check = verifyReportLink(changed, SECRET, now);
        expect(check.ok, `changed at ${i}`).toBe(false);
        expect(check.ok === false && check.problem, `changed at ${i}`).not.toBe('expired');
      }
    }
  });

  it('refuses a token signed with another secret, a truncated one and plain junk', () => {
    const token = signReportLink({ sessionId, expiresAt: inDays(14), units: 'metric' }, 'another-secret-of-some-length');
    expect(verifyReportLink(token, SECRET, now)).toEqual({ ok: false, problem: 'bad-signature' });
    expect(verifyReportLink(token.slice(0, -1), SECRET, now)).toEqual({ ok: false, problem: 'malformed' });
    expect(verifyReportLink('not-a-token', SECRET, now)).toEqual({ ok: false, problem: 'malformed' });
    expect(verifyReportLink('', SECRET, now)).toEqual({ ok: false, problem: 'malformed' });
  });

  it('keeps a later expiry from being grafted onto another token’s signature', () => {
    const a = signReportLink({ sessionId, expiresAt: inDays(1), units: 'metric' }, SECRET);
    const b = signReportLink({ sessionId, expiresAt: inDays(30), units: 'metric' }, SECRET);
    const grafted = `${b.split('.')[0]}.${a.split('.')[1]}`;
    expect(verifyReportLink(grafted, SECRET, now)).toEqual({ ok: false, problem: 'bad-signature' });
  });

  it('takes its life from REPORT_LINK_DAYS, 14 days by default, and names the variable when it is bad', () => {
    expect(DEFAULT_REPORT_LINK_DAYS).toBe(14);
    expect(reportLinkDays({})).toBe(14);
    expect(reportLinkDays({ REPORT_LINK_DAYS: '30' })).toBe(30);
    expect(() => reportLinkDays({ REPORT_LINK_DAYS: 'two weeks' })).toThrow(/REPORT_LINK_DAYS/);
    expect(() => reportLinkDays({ REPORT_LINK_DAYS: '0' })).toThrow(/REPORT_LINK_DAYS/);
  });
});
