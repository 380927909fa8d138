import { expect, test, type Page } from '@playwright/test';
import { createVirtualMachine, MM_PER_IN, type VirtualMachine } from '../../lib/leveling';
import { engineScrews } from '../../lib/session/derive';
import type { SessionEvent } from '../../lib/session/events';
import { foldEvents } from '../../lib/session/fold';
import { SESSION_STAGES } from '../../lib/session/stages';
import { signedIn } from './pages/personas';

/**
 * A whole leveling, prepare to as-left, by three people in three browsers: the technician enters what a virtual machine
 * (the engine's simulator) reads, the expert sends the engine's recommended moves, an observer watches. Every party must
 * have applied every event exactly once and in seq order.
 */
test('three people level a machine together, and each sees every event once and in order', async ({ browser }) => {
  test.setTimeout(600_000);
  const tech = await signedIn(browser, 'technician', { width: 412, height: 915 });
  const expert = await signedIn(browser, 'expert', { width: 1440, height: 900 });
  const observer = await signedIn(browser, 'reviewer', { width: 1280, height: 800 });

  // A six-screw machine (corners and middles), so every stage has screws to turn.
  const machines = (await (await tech.page.request.get('/api/machines?pageSize=100')).json()) as { rows: { id: string; screwCount: number }[] };
  const machine = machines.rows.find((m) => m.screwCount === 6);
  expect(machine, 'the demo fleet has a six-screw machine').toBeTruthy();
  const idOf = async (page: Page) => ((await (await page.request.get('/api/me')).json()) as { me: { id: string } }).me.id;
  const opened = await tech.page.request.post('/api/sessions', {
    data: { machineId: machine!.id, experts: [await idOf(expert.page)], observers: [await idOf(observer.page)] },
  });
  expect(opened.status()).toBe(201);
  const sessionId = ((await opened.json()) as { session: { id: string } }).session.id;

  const log = async () => ((await (await tech.page.request.get(`/api/sessions/${sessionId}/events`)).json()) as { events: SessionEvent[] }).events;
  const state = foldEvents(await log());
  const vm: VirtualMachine = createVirtualMachine({
    seed: 20261202,
    screws: engineScrews(state.screws),
    travelMm: state.travelMm!,
    divisionUrad: state.levelDivisionUrad!,
  });

  await expert.page.goto(`/sessions/${sessionId}/coach`);
  await observer.page.goto(`/sessions/${sessionId}/coach`);
  await tech.page.goto(`/sessions/${sessionId}/field`);
  for (const p of [tech.page, expert.page, observer.page]) await expect(p.locator('[data-testid="link-state"][data-link="live"]')).toBeVisible();

  const field = tech.page;
  const panel = field.getByTestId('stage-panel');
  const verdict = panel.getByTestId('stage-verdict');
  // The demo technician works in inches (1 in = 25.4 mm exactly, NIST SP 811).
  const inches = (mm: number, places: number) => (mm / MM_PER_IN).toFixed(places);

  async function takeReadings() {
    for (;;) {
      const next = panel.locator('[data-testid="planned-reading"][data-taken="false"]').first();
      if ((await next.count()) === 0) return;
      const key = (await next.getAttribute('data-key'))!;
      await next.click();
      const [kind, a, b] = key.split(':');
      if (kind === 'level') {
        await field.locator('input[name="divisions"]').fill(String(vm.readLevel(a as 'x' | 'y', 0, Number(b))));
      } else if (kind === 'reversal') {
        const r = vm.readLevel(a as 'x' | 'y', 0, 0);
        await field.locator('input[name="firstDiv"]').fill(String(r));
        await field.locator('input[name="secondDiv"]').fill(String(-r));
      } else if (kind === 'height') {
        const spec = state.screws.find((s) => s.id === a)!.specifiedHeightMm ?? 120;
        await field.locator('input[name="height"]').fill(inches(spec, 4));
      } else if (kind === 'sweep') {
        const s = vm.readSweep(254);
        for (const side of ['front', 'back', 'left', 'right'] as const) await field.locator(`input[name="${side}"]`).fill(inches(s[`${side}Um`] / 1000, 5));
      }
      await field.getByRole('button', { name: 'Record reading' }).click();
      await expect(panel.locator(`[data-testid="planned-reading"][data-key="${key}"]`)).toHaveAttribute('data-taken', 'true');
    }
  }

  async function markChecklist() {
    const boxes = panel.getByRole('checkbox');
    for (let i = 0; i < (await boxes.count()); i++) {
      const box = boxes.nth(i);
      if (!(await box.isChecked())) await box.check();
    }
  }

  /** The expert sends the engine's moves; the technician turns them (on the virtual machine) and answers done. */
  async function coachOneRound(page: Page) {
    const recommended = page.getByTestId('recommended-moves').getByTestId('recommended-move');
    await expect(recommended.first()).toBeVisible();
    // The coach's outbox sends them one at a time, so on a busy machine they reach the field seconds apart: answer as many
    // as were sent, each as it arrives.
    const sent = await recommended.count();
    await page.getByRole('button', { name: 'Send all recommended' }).click();
    const cards = field.getByTestId('move-card');
    for (let answered = 0; answered < sent; answered++) {
      await expect(cards.first()).toBeVisible();
      const card = cards.first();
      const screwId = (await card.getAttribute('data-screw-id'))!;
      const turns = Number(await card.locator('input[name="turns"]').inputValue());
      const screw = state.screws.find((s) => s.id === screwId)!;
      const moveId = (await card.getAttribute('data-move-id'))!;
      await card.getByRole('button', { name: 'Done' }).click();
      vm.applyMove(screwId, turns * screw.liftPerTurnMm * 1000);
      await expect(field.locator(`[data-testid="move-card"][data-move-id="${moveId}"]`)).toHaveCount(0);
    }
    // Once the answers are stored a new round begins: the stage asks for its readings again.
    await expect(panel.locator('[data-testid="planned-reading"][data-taken="false"]').first()).toBeVisible();
  }

  const rounds: Record<string, number> = {};
  for (const stage of SESSION_STAGES) {
    await expect(panel).toHaveAttribute('data-stage', stage);
    await expect(expert.page.getByTestId('coach-stage')).toHaveAttribute('data-stage', stage);
    await markChecklist();
    await takeReadings();
    rounds[stage] = 0;
    // A reading shows as taken while it is still on its way; the verdict comes from what the server stored.
    const settled = async () => {
      await expect(verdict).not.toHaveAttribute('data-status', 'incomplete');
      return verdict.getAttribute('data-status');
    };
    while ((await settled()) !== 'pass') {
      expect(rounds[stage], `${stage} converges within 8 rounds`).toBeLessThan(8);
      await coachOneRound(expert.page);
      await takeReadings();
      rounds[stage]++;
    }
    if (stage !== 'lock-as-left') await field.getByRole('button', { name: 'Next stage' }).click();
  }

  // A note from the observer (observers send nothing but notes), seen by the other two.
  await observer.page.locator('textarea[name="note"]').fill('Watching from the office: looks good.');
  await observer.page.getByRole('button', { name: 'Post note' }).click();
  for (const p of [tech.page, expert.page]) await expect(p.getByTestId('note').filter({ hasText: 'looks good' })).toBeVisible();

  // The technician finishes the session; everyone sees it ended.
  await field.getByRole('button', { name: /^Finish the session/ }).click();
  await field.getByRole('button', { name: 'Finish', exact: true }).click();
  await expect(field.getByText('This session has ended')).toBeVisible();
  for (const p of [expert.page, observer.page]) await expect(p.getByRole('status').filter({ hasText: 'Session ended at' })).toBeVisible();

  // Every party applied every stored event once, in seq order.
  const events = await log();
  const all = events.map((e) => e.seq).join(',');
  expect(events.map((e) => e.seq)).toEqual(events.map((_, i) => i + 1));
  for (const [who, p] of [['technician', tech.page], ['expert', expert.page], ['observer', observer.page]] as const) {
    await expect(p.getByTestId('seen-seqs'), `${who} saw every event once, in order`).toHaveText(all);
  }
  // The observer asks the server to recompute the hash chain: intact, every event counted.
  await observer.page.getByRole('button', { name: 'Verify the record' }).click();
  await expect(observer.page.getByTestId('chain-check').getByRole('status')).toContainText(`${events.length} events, chain intact`);

  const final = foldEvents(events);
  expect(final.stage).toBe('lock-as-left');
  expect(final.ended).not.toBeNull();
  expect(final.moves.length).toBeGreaterThan(0);
  expect(final.moves.every((m) => m.status === 'done' && m.recommended)).toBe(true);
  test.info().annotations.push({ type: 'rounds', description: JSON.stringify(rounds) });

  for (const c of [tech.context, expert.context, observer.context]) await c.close();
});
