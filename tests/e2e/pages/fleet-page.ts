import type { Page } from '@playwright/test';

/** The fleet screens: machine list, machine form and footprint editor. */
export class FleetPage {
  constructor(readonly page: Page) {}

  async openNewMachine() {
    await this.page.goto('/fleet/machines/new');
    await this.page.getByRole('heading', { name: 'New machine' }).waitFor();
  }

  async fillMachine(m: { model: string; serial: string; lengths: [number, number, number, number, number] }) {
    await this.page.getByLabel('Model').fill(m.model);
    await this.page.getByLabel('Serial number').fill(m.serial);
    const labels = [/^Table length/, /^Table width/, /^X travel/, /^Y travel/, /^Z travel/];
    for (const [i, label] of labels.entries()) await this.page.getByLabel(label).fill(String(m.lengths[i]));
  }

  /** A screw drawn in the top view. */
  screw(label: string) {
    return this.page.locator(`[data-screw="${label}"]`);
  }

  /** Drags a drawn screw by a screen offset in pixels. */
  async dragScrew(label: string, dx: number, dy: number) {
    await this.screw(label).scrollIntoViewIfNeeded();
    const box = (await this.screw(label).boundingBox())!;
    const x = box.x + box.width / 2;
    const y = box.y + box.height / 2;
    await this.page.mouse.move(x, y);
    await this.page.mouse.down();
    await this.page.mouse.move(x + dx / 2, y + dy / 2, { steps: 5 });
    await this.page.mouse.move(x + dx, y + dy, { steps: 5 });
    await this.page.mouse.up();
  }

  async importCsv(name: string, text: string) {
    await this.page.goto('/fleet');
    // The list's count appears only once the page runs in the browser: before that the file input has no handler.
    await this.page.getByRole('status').filter({ hasText: /in all/ }).waitFor();
    await this.page.locator('input[type="file"]').setInputFiles({ name, mimeType: 'text/csv', buffer: Buffer.from(text) });
  }
}
