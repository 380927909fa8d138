import { expect, type Page } from '@playwright/test';
import { DEMO_MACHINE_SERIAL } from '../../../db/seed';

/** The technician's field view. */
export class FieldPage {
  constructor(readonly page: Page) {}

  /** Opens a new session for the walkthrough machine from the start page and returns its id. */
  async openNewSession(): Promise<string> {
    await this.page.goto('/');
    // The machine count appears once the picker runs in the browser; typing before that could be lost.
    await this.page.getByText(/^(Showing \d+ of|\d+ machines?\.)/).waitFor();
    await this.page.getByLabel(/^Find a machine/).fill(DEMO_MACHINE_SERIAL);
    await this.page.getByRole('listitem').filter({ hasText: DEMO_MACHINE_SERIAL }).getByRole('button', { name: 'Start leveling' }).click();
    await this.page.waitForURL(/\/sessions\/[0-9a-f-]{36}\/field$/);
    await expect(this.page.locator('[data-link="live"]')).toBeVisible();
    return this.page.url().split('/sessions/')[1]!.split('/')[0]!;
  }

  async record(axis: 'x' | 'y', station: 'Front' | 'Middle' | 'Back', divisions: string) {
    await this.page.getByRole('button', { name: axis === 'x' ? /^X · across/ : /^Y · along/ }).click();
    await this.page.getByRole('button', { name: new RegExp(`^${station}`) }).click();
    await this.page.getByLabel('or type divisions').fill(divisions);
    await this.page.getByRole('button', { name: 'Record reading' }).click();
  }
}
