import bcrypt from 'bcryptjs';
import { describe, expect, it } from 'vitest';
import { assertPasswordAllowed, newPassword, passwordProblem, PASSWORD_MAX_BYTES } from '@/lib/auth/password';
import { AppError } from '@/lib/errors';

// The rules are Levelwire's own. One outside fact: bcrypt hashes at most the first 72 bytes of the password's
// UTF-8 (bcryptjs 3 README, "The maximum input length is 72 bytes", and its `truncates()`).
const owner = { email: 'tess.alder@northmere.test', name: 'Tess Alder' };

describe('passwordProblem', () => {
  it.each([
    ['level-demo-2026', 'the demo password'],
    ['spirit-level-42', 'an invitation test’s password'],
    ['plumb-and-level-2026', 'the browser test’s password'],
    ['fixture-password-1', 'the fixtures’ password: "password" with other words is fine'],
    ['ab1ab1ab1ab1', 'exactly 12 characters'],
    ['a1'.repeat(36), 'exactly 72 bytes'],
    ['niveau-équerre-7', 'accented letters count as letters'],
    ['tess-and-9-screws', 'the name’s letters among other words'],
  ])('allows %s (%s)', (password) => {
    expect(passwordProblem(password, owner)).toBeNull();
  });

  it.each([
    ['short-1', /at least 12 characters/, 'too short'],
    ['ab1ab1ab1ab', /at least 12 characters/, '11 characters'],
    ['level🔧12', /at least 12 characters/, 'an emoji is one character, not two UTF-16 units'],
    ['a1'.repeat(101), /at most 200 characters/, '202 characters'],
    ['a1'.repeat(36) + 'b', /73 bytes .*keep it to 72 bytes/, '73 plain bytes'],
    ['é1'.repeat(25), /75 bytes/, '50 characters but 75 bytes'],
    ['aaaaaaaaaaaaaaaa', /one character repeated/, 'one letter repeated'],
    ['7777777777777', /one character repeated/, 'one digit repeated'],
    ['1234567890123', /letter/, 'no letter'],
    ['no-digits-here-at-all', /digit/, 'no digit'],
    ['Password1234', /well-known/, 'on the list, any case'],
    ['qwerty123456', /well-known/, 'on the list'],
    ['P@ssw0rd-2026!', /well-known/, 'a common word with digits and symbols around it'],
    ['welcome-123456', /well-known/, 'welcome with digits'],
    ['Levelwire2026', /well-known/, 'the product’s name with a year'],
    ['tess.alder@northmere.test1', /e-mail address or name/, 'the e-mail with a digit'],
    ['Tess.Alder-2026', /e-mail address or name/, 'the e-mail’s local part with a year'],
    ['tess alder 1234', /e-mail address or name/, 'the name with digits'],
  ])('refuses %s: %s (%s)', (password, message) => {
    expect(passwordProblem(password, owner)).toMatch(message);
  });

  it('checks the owner only when given one', () => {
    expect(passwordProblem('tess alder 1234')).toBeNull();
  });

  it(`measures bytes as UTF-8, the bcrypt input (limit ${PASSWORD_MAX_BYTES})`, () => {
    expect(passwordProblem('€a1'.repeat(14) + 'ab', owner)).toBeNull(); // 14 × (3 + 1 + 1) + 2 = 72 bytes, 44 characters
    expect(passwordProblem('€a1'.repeat(14) + 'abc', owner)).toMatch(/73 bytes/);
    // The hash library agrees on where it would start cutting.
    expect(bcrypt.truncates('€a1'.repeat(14) + 'ab')).toBe(false);
    expect(bcrypt.truncates('€a1'.repeat(14) + 'abc')).toBe(true);
  });
});

describe('newPassword (zod) and assertPasswordAllowed', () => {
  it('the schema gives the same message, and refuses what is not text', () => {
    const bad = newPassword.safeParse('short');
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0]?.message).toBe('must be at least 12 characters');
    expect(newPassword.safeParse(12345678901234).error?.issues[0]?.message).toBe('must be text');
    expect(newPassword.parse('level-demo-2026')).toBe('level-demo-2026');
  });

  it('throws a 400 naming the field password', () => {
    let caught: unknown;
    try {
      assertPasswordAllowed('Tess-Alder-2026', owner, 'invitation');
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(AppError);
    expect(caught).toMatchObject({ code: 'bad_request:invitation', status: 400, field: 'password', message: 'password: must not be your e-mail address or name' });
    expect(() => assertPasswordAllowed('level-demo-2026', owner, 'invitation')).not.toThrow();
  });
});
