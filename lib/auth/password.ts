import { z } from 'zod';
import { AppError } from '@/lib/errors';

/**
 * Levelwire's password rules, in one place: the invitation form shows them, the zod schema and the routes
 * enforce them. Plain functions with no Node imports, so the browser checks the same rules before sending.
 */

export const PASSWORD_MIN_CHARS = 12;
export const PASSWORD_MAX_CHARS = 200;
/** bcrypt hashes only the first 72 bytes of its input; a longer password is refused rather than cut silently. */
export const PASSWORD_MAX_BYTES = 72;

/** The rules as the invitation page lists them. */
export const PASSWORD_RULES = [
  `At least ${PASSWORD_MIN_CHARS} characters, with a letter and a digit; a few unrelated words work well`,
  `At most ${PASSWORD_MAX_BYTES} bytes (plain letters and digits take 1 each, letters like é 2, most symbols and emoji 3 or 4)`,
  'Not your e-mail address or name, not one character repeated, not a well-known password',
] as const;

/**
 * A short list of the most used passwords of 12 characters or more (shorter ones fail the length rule
 * anyway), written from memory of published breach lists rather than copied from one; compared without case.
 */
const COMMON_PASSWORDS = new Set([
  '123456789012',
  '1234567890123',
  '123456789abc',
  '1q2w3e4r5t6y',
  '1qaz2wsx3edc',
  'a1b2c3d4e5f6',
  'abc123456789',
  'abcd12345678',
  'abcdef123456',
  'qwerty123456',
  'qwertyuiop12',
  'qwertyuiop123',
  'qwerty12345678',
  'asdfghjkl123',
  'zxcvbnm12345',
  'q1w2e3r4t5y6',
  'zaq12wsxcde3',
  'iloveyou1234',
  'password1234',
  'password12345',
  'password123456',
]);

/**
 * Words that, with only digits and symbols around them, make a well-known password (`Password-2026!`,
 * `welcome12345`, `p@ssw0rd1234`): compared with the password's letters alone, lower case. Also from memory.
 */
const COMMON_WORDS = new Set([
  'password',
  'passwrd',
  'psswrd',
  'pssword',
  'passwort',
  'qwerty',
  'qwertyuiop',
  'qwertz',
  'azerty',
  'asdfgh',
  'asdfghjkl',
  'zxcvbnm',
  'qazwsx',
  'qwe',
  'abc',
  'abcd',
  'abcdef',
  'letmein',
  'welcome',
  'iloveyou',
  'admin',
  'administrator',
  'changeme',
  'secret',
  'login',
  'master',
  'monkey',
  'dragon',
  'football',
  'baseball',
  'sunshine',
  'princess',
  'trustno',
  'summer',
  'winter',
  'spring',
  'autumn',
  'levelwire',
]);

const utf8 = new TextEncoder();
const lettersOf = (s: string) => s.toLowerCase().replace(/[^\p{L}]/gu, '');

/** Who the password belongs to, for the rule that it is not their e-mail or name. */
export type PasswordOwner = { email?: string | null | undefined; name?: string | null | undefined };

/**
 * The first rule a new password breaks, worded to follow the field's name ("password: must …"), or null.
 * Lengths count characters as people see them (code points), and bytes as bcrypt does (UTF-8).
 */
export function passwordProblem(password: string, owner: PasswordOwner = {}): string | null {
  const chars = [...password];
  if (chars.length < PASSWORD_MIN_CHARS) return `must be at least ${PASSWORD_MIN_CHARS} characters`;
  if (chars.length > PASSWORD_MAX_CHARS) return `must be at most ${PASSWORD_MAX_CHARS} characters`;
  const bytes = utf8.encode(password).length;
  if (bytes > PASSWORD_MAX_BYTES) {
    return `is ${bytes} bytes long in UTF-8; only the first ${PASSWORD_MAX_BYTES} would count, so keep it to ${PASSWORD_MAX_BYTES} bytes (fewer accented letters, symbols or emoji)`;
  }
  if (new Set(chars).size === 1) return 'must not be one character repeated';
  if (!/\p{L}/u.test(password)) return 'must contain a letter';
  if (!/\d/.test(password)) return 'must contain a digit';
  const letters = lettersOf(password);
  if (COMMON_PASSWORDS.has(password.toLowerCase()) || COMMON_WORDS.has(letters)) return 'is a well-known password; choose a few unrelated words of your own';
  if (isPersonal(password, letters, owner)) return 'must not be your e-mail address or name';
  return null;
}

/** The password is the e-mail, its local part or the name, or one of them with only digits and symbols added. */
function isPersonal(password: string, letters: string, { email, name }: PasswordOwner): boolean {
  const plain = password.trim().toLowerCase();
  const candidates = [email, email?.split('@')[0], name].filter((c): c is string => Boolean(c?.trim()));
  return candidates.some((c) => {
    const own = c.trim().toLowerCase();
    const ownLetters = lettersOf(own);
    return plain === own || plain.replace(/\s+/g, '') === own.replace(/\s+/g, '') || (ownLetters.length > 0 && letters === ownLetters);
  });
}

/** A new password as a zod field: the rules that need no owner (the owner's e-mail and name are checked by `assertPasswordAllowed`). */
export const newPassword = z.string({ error: 'must be text' }).superRefine((password, ctx) => {
  const problem = passwordProblem(password);
  if (problem) ctx.addIssue({ code: 'custom', message: problem });
});

/** Throws a 400 naming the field `password` when the password breaks a rule, the owner's e-mail and name included. */
export function assertPasswordAllowed(password: string, owner: PasswordOwner, surface: string): void {
  const problem = passwordProblem(password, owner);
  if (problem) throw new AppError(`bad_request:${surface}`, `password: ${problem}`, 'password');
}
