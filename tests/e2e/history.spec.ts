import { randomUUID } from 'node:crypto';
import { expect, test } from '@playwright/test';
import type { SessionEvent } from '../../lib/session/events';
import { eventHash } from '../../lib/session/hash-chain';
import { signedIn } from './pages/personas';

/** A session's export file as another Levelwire would write it: rough level in two rounds, ended. Tilt X found `xFound` µrad. */
function sessionFile(machineId: string, start: number, xFound: number) {
  const sessionId = randomUUID();
  const tech = randomUUID();
  const events: SessionEvent[] = [];
  const add = (type: SessionEvent['type'], payload: object) => {
    const prevHash = events.at(-1)?.hash ?? '';
    const seq = events.length + 1;
    const e = { sessionId, seq, id: randomUUID(), type, payload, actorId: tech, actorRole: 'technician', clientTs: null, serverTs: new Date(start + seq * 30_000).toISOString(), prevHash };
    events.push({ ...e, hash: eventHash(prevHash, e as SessionEvent) } as SessionEvent);
  };
  const screws = ['FL', 'FR', 'RL', 'RR'].map((label, i) => ({ id: randomUUID(), label, kind: 'corner', xMm: i % 2 ? 900 : -900, yMm: i < 2 ? -700 : 700, liftPerTurnMm: 3, specifiedHeightMm: null }));
  const level = (axis: 'x' | 'y', slopeUrad: number) => add('reading:recorded', { kind: 'level', stage: 'rough-level', axis, positionMm: 0, divisions: slopeUrad / 20, slopeUrad });
  add('session:opened', { machineId, levelDivisionUrad: 20, machineLabel: 'History VMC (demo)', travelMm: 500, tolerances: { levelUrad: 20, twistUrad: 20, bowUrad: 20, sweepTirUm: 12.7 }, screws });
  add('participant:added', { userId: tech, name: 'Technician elsewhere', part: 'technician' });
  add('stage:entered', { stage: 'rough-level' });
  level('x', xFound);
  level('y', -20);
  const moveId = randomUUID();
  add('move:sent', { moveId, screwId: screws[0]!.id, stage: 'rough-level', raiseUm: 30, turns: 0.01, degrees: 3.6, recommended: true });
  add('move:answered', { moveId, outcome: 'done', turns: 0.01, raiseUm: 30 });
  level('x', 5);
  level('y', 0);
  add('session:ended', {});
  return { sessionId, file: { format: 'levelwire-session', version: 1, exportedAt: new Date(start + 3_600_000).toISOString(), session: { id: sessionId, state: 'ended', machine: { id: machineId, label: 'History VMC (demo)', model: null, serial: null } }, events } };
}

test('an admin imports two visits’ records (a changed file is refused, naming its event) and sees the machine’s history with links to the replays', async ({ browser }) => {
  test.setTimeout(180_000);
  const { context, page } = await signedIn(browser, 'admin', { width: 1280, height: 1000 });
  // A machine of its own for this run, so the demo machines keep their history.
  const { sites } = (await (await page.request.get('/api/sites')).json()) as { sites: { id: string }[] };
  const serial = `HIST-${Date.now().toString(36)}`;
  const created = await page.request.post('/api/machines', {
    data: {
      siteId: sites[0]!.id,
      model: 'History VMC (demo)',
      serial,
      tableLengthMm: 1000,
      tableWidthMm: 500,
      travelXMm: 800,
      travelYMm: 500,
      travelZMm: 500,
      checkIntervalMonths: 9,
      screws: ['FL', 'FR', 'RL', 'RR'].map((label, i) => ({ label, kind: 'corner', xMm: i % 2 ? 900 : -900, yMm: i < 2 ? -700 : 700, thread: { unit: 'mm', value: 3 } })),
    },
  });
  expect(created.status()).toBe(201);
  const machineId = ((await created.json()) as { machine: { id: string } }).machine.id;
  const first = sessionFile(machineId, Date.UTC(2025, 1, 10, 8), 60);
  const second = sessionFile(machineId, Date.UTC(2025, 10, 10, 8), 90);

  await page.goto('/sessions/import');
  const choose = (name: string, body: unknown) => page.getByLabel('Session file (the JSON export)').setInputFiles({ name, mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(body)) });
  const changed = structuredClone(first.file);
  (changed.events[3]!.payload as { divisions: number }).divisions = 1;
  await choose('changed.json', changed);
  await expect(page.getByTestId('import-preview')).toContainText('History VMC (demo)');
  await page.getByRole('button', { name: 'Verify and import' }).click();
  await expect(page.getByRole('alert').filter({ hasText: 'Nothing was imported' })).toContainText('the first bad event is #4 (reading:recorded): content does not match its hash');

  for (const { file } of [first, second]) {
    await choose('visit.json', file);
    await page.getByRole('button', { name: 'Verify and import' }).click();
    await expect(page.getByRole('status').filter({ hasText: 'Chain intact' })).toContainText(`${file.events.length} events`);
  }
  await expect(page.getByRole('link', { name: 'Open the replay' })).toHaveAttribute('href', `/sessions/${second.sessionId}/replay`);

  await page.goto(`/fleet/machines/${machineId}`);
  const history = page.getByTestId('machine-history');
  await expect(history.locator('tbody tr')).toHaveCount(2);
  await expect(history.locator('tbody tr').first()).toHaveAttribute('data-session', first.sessionId);
  // The demo admin works in inches: 60 and 90 µrad are 0.00060 and 0.00090 in/10 in (1 µrad = 1e-6 in/in; TRADE.md §2).
  await expect(history.locator('tbody tr').first().locator('td').nth(1)).toContainText('0.00060');
  await expect(history.locator('tbody tr').nth(1).locator('td').nth(1)).toContainText('0.00090');
  const tiltX = history.locator('[data-measure="tiltX"]');
  await expect(tiltX.locator('[data-point="found"]')).toHaveCount(2);
  await expect(tiltX.locator('[data-point="left"]')).toHaveCount(2);
  // Never leveled and nothing approved: due now.
  await expect(page.getByTestId('history-due')).toContainText('Due now');
  await expect(history.getByRole('link', { name: 'Export the readings as CSV' }).first()).toHaveAttribute('href', `/api/sessions/${first.sessionId}/export?format=csv`);
  await tiltX.locator(`a[data-session="${first.sessionId}"][data-point="found"]`).click();
  await page.waitForURL(new RegExp(`/sessions/${first.sessionId}/replay$`), { timeout: 60_000 });
  await context.close();
});
