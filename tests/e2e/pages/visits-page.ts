import { expect, type Page } from '@playwright/test';

/** `YYYY-MM-DDTHH:mm` in the browser's zone (the test and Chromium run on the same machine). */
export function localInputValue(d: Date): string {
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}

/** The visits page and the development mailbox, as an admin uses them. */
export class VisitsPage {
  constructor(readonly page: Page) {}

  async open() {
    await this.page.goto('/visits');
    await expect(this.page.getByRole('heading', { name: 'Schedule a visit' })).toBeVisible();
  }

  /** Fills the schedule form: the machine found by its serial, the people by name, the time in the browser's zone. */
  async schedule({ serial, technician, expert, at, notes }: { serial: string; technician: string; expert?: string; at: Date; notes?: string }) {
    const form = this.page.getByRole('form', { name: 'Schedule a visit' });
    await form.getByRole('combobox', { name: 'Machine' }).fill(serial);
    await form.getByRole('listbox', { name: 'Machines' }).getByRole('button', { name: new RegExp(serial) }).click();
    await expect(form.getByTestId('chosen-machine')).toContainText(serial);
    await form.getByLabel('Technician').selectOption({ label: technician });
    if (expert) await form.getByLabel('Expert (optional)').selectOption({ label: expert });
    await form.getByLabel('Date and time').fill(localInputValue(at));
    if (notes) await form.getByLabel('Notes (optional)').fill(notes);
    await form.getByRole('button', { name: 'Schedule visit' }).click();
  }

  scheduledNotice() {
    return this.page.getByRole('status').filter({ hasText: 'Visit scheduled for' });
  }

  /** The development mailbox, only mail to one address. */
  async openMailbox(to: string) {
    await this.page.goto(`/admin/mailbox?to=${encodeURIComponent(to)}`);
    await expect(this.page.getByRole('heading', { name: 'Mailbox' })).toBeVisible();
  }

  mail(subject: string | RegExp) {
    return this.page.getByTestId('mail').filter({ hasText: subject });
  }

  async runReminders() {
    await this.page.getByRole('button', { name: 'Send due reminders now' }).click();
    await expect(this.page.getByRole('status').filter({ hasText: /Sent \d+ due reminders?|Nothing new to remind/ })).toBeVisible();
  }
}
