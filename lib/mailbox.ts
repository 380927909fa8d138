import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import { env } from './env';

export type CapturedMail = { id: string; receivedAt: string; from: string; to: string[]; subject: string; text: string };

/** True when the loopback mail fake runs (development and tests); the mailbox page exists only then. */
export function mailboxEnabled(): boolean {
  return Boolean(env().MAILBOX_DIR);
}

/** Messages the fake caught, newest first; optionally only those to one address. */
export async function listCapturedMail({ to, limit = 100 }: { to?: string; limit?: number } = {}): Promise<CapturedMail[]> {
  const dir = env().MAILBOX_DIR;
  if (!dir) return [];
  const names = (await readdir(dir).catch(() => [] as string[])).filter((n) => n.endsWith('.json')).sort().reverse();
  const out: CapturedMail[] = [];
  for (const name of names) {
    const mail = JSON.parse(await readFile(path.join(dir, name), 'utf8')) as CapturedMail;
    if (!to || mail.to.some((a) => a.toLowerCase() === to.toLowerCase())) out.push(mail);
    if (out.length >= limit) break;
  }
  return out;
}
