import { expect, type Page } from '@playwright/test';

/** The technician's field view. */
export class FieldPage {
  constructor(readonly page: Page) {}

  /** Opens a new session from the start page's first machine and returns its id. */
  async openNewSession(): Promise<string> {
    await this.page.goto('/');
    await this.page.getByRole('button', { name: 'Start leveling' }).first().click();
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
