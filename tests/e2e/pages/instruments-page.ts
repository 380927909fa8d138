import { expect, type Page } from '@playwright/test';

/** The instrument list, the new-instrument form and an instrument's page with its certificate. */
export class InstrumentsPage {
  constructor(readonly page: Page) {}

  /** Adds a level through the new-instrument form and waits for its own page; returns its id. */
  async addLevel({ model, serial, sensitivity, unit, due }: { model: string; serial: string; sensitivity: string; unit: string; due: string }): Promise<string> {
    await this.page.goto('/instruments');
    await this.page.getByRole('link', { name: 'Add instrument' }).click();
    await this.page.waitForURL(/\/instruments\/new$/);
    await this.page.getByLabel('Kind').selectOption('level');
    await this.page.getByLabel('Serial').fill(serial);
    await this.page.getByLabel('Model').fill(model);
    await this.page.getByLabel('Sensitivity per division').fill(sensitivity);
    await this.page.getByLabel('Sensitivity unit').selectOption(unit);
    await this.page.getByLabel('Calibration due').fill(due);
    await this.page.getByRole('button', { name: 'Add instrument' }).click();
    await this.page.waitForURL(/\/instruments\/[0-9a-f-]{36}$/);
    await expect(this.page.getByRole('heading', { name: model })).toBeVisible();
    return this.page.url().split('/instruments/')[1]!;
  }

  /** Chooses a file for the certificate and presses upload. */
  async uploadCertificate(file: { name: string; mimeType: string; buffer: Buffer }) {
    await this.page.getByLabel(/Upload the certificate|Replace with a new certificate/).setInputFiles(file);
    await expect(this.page.getByTestId('chosen-file')).toContainText(file.name);
    await this.page.getByRole('button', { name: 'Upload certificate' }).click();
  }

  certificate() {
    return this.page.getByTestId('certificate');
  }

  /** The list filtered to one serial; returns that row. */
  async listRow(serial: string) {
    await this.page.goto('/instruments');
    await this.page.getByLabel('Find by model or serial').fill(serial);
    const row = this.page.getByRole('row').filter({ hasText: serial });
    await expect(row).toHaveCount(1);
    return row;
  }
}
