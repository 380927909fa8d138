import { expect, type Locator, type Page } from '@playwright/test';
import { DEMO_MACHINE_SERIAL } from '../../../db/seed';

/** The technician's field view. */
export class FieldPage {
  constructor(readonly page: Page) {}

  get stagePanel(): Locator {
    return this.page.getByTestId('stage-panel');
  }

  get outboxCount(): Locator {
    return this.page.getByTestId('outbox-count');
  }

  linkState(link: 'live' | 'offline' | 'connecting'): Locator {
    return this.page.locator(`[data-testid="link-state"][data-link="${link}"]`);
  }

  /** Opens a new session for the walkthrough machine from the start page and returns its id. */
  async openNewSession(): Promise<string> {
    await this.page.goto('/');
    // The machine count appears once the picker runs in the browser; typing before that could be lost.
    await this.page.getByText(/^(Showing \d+ of|\d+ machines?\.)/).waitFor();
    await this.page.getByLabel(/^Find a machine/).fill(DEMO_MACHINE_SERIAL);
    const row = this.page.getByRole('listitem').filter({ hasText: DEMO_MACHINE_SERIAL });
    await row.getByRole('button', { name: /^Start leveling/ }).click();
    // Opening asks who coaches: the walkthrough's expert (Ewan Marsh, expert@) coaches.
    await row.getByLabel('Ewan Marsh').check();
    await row.getByRole('button', { name: /^Open with/ }).click();
    await this.page.waitForURL(/\/sessions\/[0-9a-f-]{36}\/field$/);
    await expect(this.linkState('live')).toBeVisible();
    return this.page.url().split('/sessions/')[1]!.split('/')[0]!;
  }

  /** Opens the field view of a session and waits for the page to run (the planned readings or the spot chooser show). */
  async open(sessionId: string) {
    await this.page.goto(`/sessions/${sessionId}/field`);
    await expect(this.stagePanel).toBeVisible();
  }

  /** A level reading at a station, outside the stage's plan (the spot reading chooser). */
  async record(axis: 'x' | 'y', station: 'Front' | 'Middle' | 'Back', divisions: string) {
    const axisButton = this.page.getByRole('button', { name: axis === 'x' ? /^X · across/ : /^Y · along/ });
    if (!(await axisButton.isVisible())) await this.page.getByRole('button', { name: 'Another level reading' }).click();
    await axisButton.click();
    await this.page.getByRole('button', { name: new RegExp(`^${station}`) }).click();
    await this.page.getByLabel('or type divisions').fill(divisions);
    await this.page.getByRole('button', { name: 'Record reading' }).click();
  }

  /** Selects a planned reading of the current stage by its key (`level:x:-250`, `sweep`, …). */
  async selectPlanned(key: string) {
    await this.stagePanel.locator(`[data-testid="planned-reading"][data-key="${key}"]`).click();
  }

  /** Enters the next stage, confirming when the current one does not pass. */
  async nextStage() {
    await this.page.getByRole('button', { name: 'Next stage' }).click();
    const anyway = this.page.getByRole('button', { name: 'Continue anyway' });
    if (await anyway.isVisible()) await anyway.click();
  }
}
