import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import { expect, type Page } from '@playwright/test';

/** The admin's users and invitations page. */
export class AdminUsersPage {
  constructor(readonly page: Page) {}

  async open() {
    await this.page.goto('/admin/users');
    await expect(this.page.getByRole('heading', { name: 'People' })).toBeVisible();
  }

  async invite(email: string, role: 'technician' | 'expert' | 'reviewer' | 'admin') {
    const form = this.page.getByRole('region', { name: 'Invite someone' });
    await form.getByLabel('E-mail').fill(email);
    await form.getByLabel('Role').selectOption(role);
    await form.getByRole('button', { name: 'Send invitation' }).click();
    await expect(this.page.getByRole('status').filter({ hasText: `Invitation sent to ${email}` })).toBeVisible();
  }

  pending() {
    return this.page.getByTestId('pending-invitations');
  }

  userRow(email: string) {
    return this.page.locator(`tr[data-email="${email}"]`);
  }
}

export type CaughtMail = { subject: string; text: string; attachments?: { filename: string | null; contentType: string; size: number; file: string }[] };

/** The newest message the loopback mail fake caught for an address (JSON files in MAILBOX_DIR), waiting for it to arrive. */
export async function readMail(to: string, timeoutMs = 10_000, newerThan = 0): Promise<CaughtMail> {
  const dir = process.env.MAILBOX_DIR;
  if (!dir) throw new Error('MAILBOX_DIR is not set: run the browser tests with the mail fake’s folder');
  const until = Date.now() + timeoutMs;
  for (;;) {
    for (const name of (await readdir(dir).catch(() => [] as string[])).filter((n) => n.endsWith('.json')).sort().reverse()) {
      const mail = JSON.parse(await readFile(path.join(dir, name), 'utf8')) as CaughtMail & { to: string[]; receivedAt: string };
      if (Date.parse(mail.receivedAt) < newerThan) continue;
      if (mail.to.some((a) => a.toLowerCase() === to.toLowerCase())) return mail;
    }
    if (Date.now() > until) throw new Error(`no e-mail to ${to} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}
