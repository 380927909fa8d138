import { expect, type Locator, type Page } from '@playwright/test';

/** The expert's coach view of a session (also what observers and readers see). */
export class CoachPage {
  constructor(readonly page: Page) {}

  async goto(sessionId: string) {
    await this.page.goto(`/sessions/${sessionId}/coach`);
    await this.waitLive();
  }

  /** The view is joined to the session's room and has caught up. */
  async waitLive() {
    await expect(this.page.getByTestId('link-state')).toHaveAttribute('data-link', 'live');
  }

  get link(): Locator {
    return this.page.getByTestId('link-state');
  }

  get stage(): Locator {
    return this.page.getByTestId('coach-stage');
  }

  async expectStage(stage: string) {
    await expect(this.stage).toHaveAttribute('data-stage', stage);
  }

  get recommended(): Locator {
    return this.page.getByTestId('recommended-moves').getByTestId('recommended-move');
  }

  /** Screw ids of the engine's recommended moves, in table order. */
  async recommendedScrewIds(): Promise<string[]> {
    return this.recommended.evaluateAll((rows) => rows.map((r) => r.getAttribute('data-screw-id') ?? ''));
  }

  /** Sends every recommended move as it stands; resolves once each shows in the moves list as pending. */
  async sendAllRecommended(): Promise<number> {
    const count = await this.recommended.count();
    const before = await this.moveRows.count();
    await this.page.getByRole('button', { name: 'Send all recommended' }).click();
    await expect(this.moveRows).toHaveCount(before + count);
    return count;
  }

  /** Edits the turns of one recommended move (by screw id) and sends that row alone. */
  async sendRecommendedWithTurns(screwId: string, turns: string) {
    const row = this.recommended.and(this.page.locator(`[data-screw-id="${screwId}"]`));
    await row.getByRole('spinbutton').fill(turns);
    await row.getByRole('button', { name: 'Send', exact: true }).click();
  }

  /** Writes a move: a screw by its label, turns (+ raises), and an optional comment for the technician. */
  async writeMove(screwLabel: string, turns: string, comment?: string) {
    const form = this.page.locator('details').filter({ hasText: 'Write a move' });
    if (!(await form.evaluate((d) => (d as HTMLDetailsElement).open))) await form.locator('summary').click();
    const select = form.getByLabel('Screw');
    const value = await select.locator('option', { hasText: new RegExp(`^${screwLabel} \\(`) }).getAttribute('value');
    await select.selectOption(value!);
    await form.getByLabel(/^Turns/).fill(turns);
    if (comment) await form.getByLabel(/^Comment/).fill(comment);
    await form.getByRole('button', { name: 'Send move' }).click();
  }

  get moveRows(): Locator {
    return this.page.getByTestId('move-row');
  }

  moveRow(moveId: string): Locator {
    return this.page.locator(`[data-testid="move-row"][data-move-id="${moveId}"]`);
  }

  async postNote(text: string) {
    await this.page.getByRole('textbox', { name: 'Note', exact: true }).fill(text);
    await this.page.getByRole('button', { name: 'Post note' }).click();
  }

  get notes(): Locator {
    return this.page.getByTestId('note');
  }

  get presencePeople(): Locator {
    return this.page.getByTestId('presence').getByTestId('presence-person');
  }

  /** User ids of those connected now, as the presence panel lists them. */
  async presentUserIds(): Promise<string[]> {
    return this.presencePeople.evaluateAll((rows) => rows.map((r) => r.getAttribute('data-user-id') ?? ''));
  }

  get baseNumbers(): Locator {
    return this.page.getByTestId('base-numbers');
  }

  /** Seqs in the order this view applied them (the hidden output kept for browser tests). */
  async seenSeqs(): Promise<number[]> {
    const text = (await this.page.getByTestId('seen-seqs').textContent()) ?? '';
    return text === '' ? [] : text.split(',').map(Number);
  }

  async endSession(reason?: string) {
    await this.page.getByRole('button', { name: 'End session' }).click();
    if (reason) await this.page.getByLabel('Reason (optional)').fill(reason);
    await this.page.getByRole('button', { name: 'Yes, end the session' }).click();
  }
}
