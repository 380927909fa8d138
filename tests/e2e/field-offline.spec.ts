import { expect, test, type Page } from '@playwright/test';
import sharp from 'sharp';
import { DEMO_MACHINE_SERIAL, DEMO_PASSWORD } from '../../db/seed';
import type { SessionEvent } from '../../lib/session/events';
import { FieldPage } from './pages/field-page';
import { emailOf, signedIn } from './pages/personas';

/** The ids of what waits in one of the field view's IndexedDB stores (commands or photos), oldest first. */
async function outboxIds(page: Page, store: 'outbox' | 'photos' = 'outbox'): Promise<string[]> {
  return page.evaluate(
    (store) =>
      new Promise<string[]>((resolve, reject) => {
        const open = indexedDB.open('levelwire');
        open.onerror = () => reject(open.error);
        open.onsuccess = () => {
          const all = open.result.transaction(store).objectStore(store).getAll();
          all.onerror = () => reject(all.error);
          all.onsuccess = () => resolve((all.result as { id: string; queuedAt: number }[]).sort((a, b) => a.queuedAt - b.queuedAt).map((c) => c.id));
        };
      }),
    store,
  );
}

/**
 * Issue 5, offline: the field view keeps readings typed without a network, survives a reload without a network
 * (its service worker serves the page and scripts), and sends them in order once the link is back; the server
 * stores each exactly once.
 */
test('readings typed offline survive a reload and are stored once each, in entry order', async ({ browser }) => {
  const tech = await signedIn(browser, 'technician', { width: 390, height: 844 });
  const expert = await signedIn(browser, 'expert');
  const me = async (page: Page) => ((await (await page.request.get('/api/me')).json()) as { me: { id: string } }).me.id;
  const { rows } = (await (await tech.page.request.get(`/api/machines?q=${DEMO_MACHINE_SERIAL}`)).json()) as { rows: { id: string; serial: string }[] };
  const machine = rows.find((m) => m.serial === DEMO_MACHINE_SERIAL);
  expect(machine, 'the demo fleet has the walkthrough machine').toBeTruthy();
  const opened = await tech.page.request.post('/api/sessions', { data: { machineId: machine!.id, experts: [await me(expert.page)] } });
  expect(opened.status()).toBe(201);
  const sessionId = ((await opened.json()) as { session: { id: string } }).session.id;
  await expert.context.close();

  const field = new FieldPage(tech.page);
  await field.open(sessionId);
  await expect(field.linkState('live')).toBeVisible();
  // The service worker controls the page once it has claimed it (first visit; the page cached itself).
  await tech.page.waitForFunction(() => navigator.serviceWorker.controller !== null, undefined, { timeout: 20_000 });

  // Walk to the twist stage, which asks for three level readings across (X) at the front, middle and back.
  for (const stage of ['height-check', 'zero-level', 'rough-level', 'twist']) {
    await field.nextStage();
    await expect(field.stagePanel).toHaveAttribute('data-stage', stage);
  }
  await expect(field.outboxCount).toHaveText('0');

  await tech.context.setOffline(true);
  await expect(field.linkState('offline')).toBeVisible();

  const typed = [
    { key: 'level:x:-250', divisions: '1.5' },
    { key: 'level:x:0', divisions: '-0.5' },
    { key: 'level:x:250', divisions: '2' },
  ];
  for (const [i, r] of typed.entries()) {
    await field.selectPlanned(r.key);
    await tech.page.locator('input[name="divisions"]').fill(r.divisions);
    await tech.page.getByRole('button', { name: 'Record reading' }).click();
    await expect(field.outboxCount).toHaveText(String(i + 1));
    await expect(field.stagePanel.locator(`[data-testid="planned-reading"][data-key="${r.key}"]`)).toHaveAttribute('data-pending', 'true');
  }
  await expect(field.outboxCount).toHaveText('3');
  await expect(tech.page.getByTestId('reading-pending')).toHaveCount(3);
  const queuedIds = await outboxIds(tech.page);
  expect(queuedIds).toHaveLength(3);
  // Nothing reached the server while offline (the test's own request context is not cut off).
  const whileOffline = (await (await tech.page.request.get(`/api/sessions/${sessionId}/events`)).json()) as { events: SessionEvent[] };
  expect(whileOffline.events.filter((e) => e.type === 'reading:recorded')).toHaveLength(0);

  // A reload with no network: the service worker serves the page and its scripts, the outbox is still there.
  const reloaded = await tech.page.reload();
  expect(reloaded?.fromServiceWorker(), 'the page came from the service worker').toBe(true);
  await expect(field.stagePanel).toHaveAttribute('data-stage', 'twist');
  await expect(field.linkState('offline')).toBeVisible();
  await expect(field.outboxCount).toHaveText('3');
  await expect(tech.page.getByTestId('reading-pending')).toHaveCount(3);

  await tech.context.setOffline(false);
  await expect(field.linkState('live')).toBeVisible({ timeout: 20_000 });
  await expect(field.outboxCount).toHaveText('0', { timeout: 20_000 });
  await expect(field.stagePanel.locator('[data-testid="planned-reading"][data-taken="true"]')).toHaveCount(3);

  const { events } = (await (await tech.page.request.get(`/api/sessions/${sessionId}/events`)).json()) as { events: SessionEvent[] };
  const readings = events.filter((e): e is SessionEvent<'reading:recorded'> => e.type === 'reading:recorded');
  // By value: each typed reading once, in the order typed.
  expect(readings.map((e) => (e.payload.kind === 'level' ? e.payload.divisions : null))).toEqual(typed.map((r) => Number(r.divisions)));
  expect(readings.map((e) => e.payload.stage)).toEqual(['twist', 'twist', 'twist']);
  // By id: the outbox's ids, each stored once, in the order they were queued.
  expect(readings.map((e) => e.id)).toEqual(queuedIds);
  expect(new Set(events.map((e) => e.id)).size).toBe(events.length);
  // Seqs strictly increasing with no gaps: nothing stored twice or lost between them.
  expect(events.map((e) => e.seq)).toEqual(events.map((_, i) => i + 1));

  await tech.context.close();
});

/**
 * A shared tablet: a reading typed offline stays queued under its maker. Another person signed in on the same device
 * never sends it; its maker, back on the device, does, once.
 */
test('a reading left queued by one person is never sent under another’s name on a shared device', async ({ browser }) => {
  const tech = await signedIn(browser, 'technician', { width: 390, height: 844 });
  const page = tech.page;
  const { rows } = (await (await page.request.get(`/api/machines?q=${DEMO_MACHINE_SERIAL}`)).json()) as { rows: { id: string; serial: string }[] };
  const { people } = (await (await page.request.get('/api/people?role=expert')).json()) as { people: { id: string; name: string }[] };
  const ewan = people.find((p) => p.name === 'Ewan Marsh')!;
  const opened = await page.request.post('/api/sessions', { data: { machineId: rows.find((m) => m.serial === DEMO_MACHINE_SERIAL)!.id, experts: [ewan.id] } });
  const sessionId = ((await opened.json()) as { session: { id: string } }).session.id;
  const readingsStored = async () => {
    const res = await browser.newContext().then(async (c) => {
      const p = await c.newPage();
      await p.goto('/sign-in');
      await p.getByLabel('E-mail').fill(emailOf('reviewer'));
      await p.getByLabel('Password').fill(DEMO_PASSWORD);
      await p.getByRole('button', { name: 'Sign in' }).click();
      await p.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      const body = (await (await p.request.get(`/api/sessions/${sessionId}/events`)).json()) as { events: SessionEvent[] };
      await c.close();
      return body;
    });
    return res.events.filter((e) => e.type === 'reading:recorded');
  };
  const signInHere = async (role: 'technician' | 'expert') => {
    await tech.context.clearCookies();
    await page.goto('/sign-in');
    await page.getByLabel('E-mail').fill(emailOf(role));
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
  };

  const field = new FieldPage(page);
  await field.open(sessionId);
  await expect(field.linkState('live')).toBeVisible();
  await tech.context.setOffline(true);
  await expect(field.linkState('offline')).toBeVisible();
  await field.record('x', 'Middle', '1');
  await expect(field.outboxCount).toHaveText('1');

  // The technician's sign-in ends while the entry waits (the device changes hands); the network comes back.
  await tech.context.clearCookies();
  await tech.context.setOffline(false);
  await signInHere('expert');
  await page.goto(`/sessions/${sessionId}/coach`);
  await expect(page.locator('[data-testid="link-state"][data-link="live"]')).toBeVisible(); // the expert's view runs and is connected
  await page.waitForTimeout(2000);
  expect(await readingsStored()).toHaveLength(0);

  // The technician back on the device: the queued reading goes out under their name, once.
  await signInHere('technician');
  await field.open(sessionId);
  await expect(field.outboxCount).toHaveText('0', { timeout: 20_000 });
  const stored = await readingsStored();
  expect(stored.map((e) => [(e.payload as { divisions: number }).divisions, e.actorRole])).toEqual([[1, 'technician']]);
  await tech.context.close();
});

/**
 * A photo attached without a network (the pads before lowering, say) is kept on the device with its image, survives a
 * reload without a network, and is stored once, under the id it was kept with, when the link is back.
 */
test('a photo attached offline survives a reload and is stored once when the link is back', async ({ browser }) => {
  const tech = await signedIn(browser, 'technician', { width: 390, height: 844 });
  const page = tech.page;
  const { rows } = (await (await page.request.get(`/api/machines?q=${DEMO_MACHINE_SERIAL}`)).json()) as { rows: { id: string; serial: string }[] };
  const { people } = (await (await page.request.get('/api/people?role=expert')).json()) as { people: { id: string; name: string }[] };
  const opened = await page.request.post('/api/sessions', { data: { machineId: rows.find((m) => m.serial === DEMO_MACHINE_SERIAL)!.id, experts: [people[0]!.id] } });
  expect(opened.status()).toBe(201);
  const sessionId = ((await opened.json()) as { session: { id: string } }).session.id;
  const photosStored = async () =>
    ((await (await page.request.get(`/api/sessions/${sessionId}/events`)).json()) as { events: SessionEvent[] }).events.filter(
      (e): e is SessionEvent<'photo:attached'> => e.type === 'photo:attached',
    );

  const field = new FieldPage(page);
  await field.open(sessionId);
  await expect(field.linkState('live')).toBeVisible();
  await page.waitForFunction(() => navigator.serviceWorker.controller !== null, undefined, { timeout: 20_000 });
  await tech.context.setOffline(true);
  await expect(field.linkState('offline')).toBeVisible();

  const png = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 40, g: 120, b: 200 } } }).png().toBuffer();
  await page.locator('input[name="file"]').setInputFiles({ name: 'pads.png', mimeType: 'image/png', buffer: png });
  await page.locator('input[name="caption"]').fill('pads before lowering');
  await page.getByRole('button', { name: 'Attach photo' }).click();
  await expect(page.getByText('Photo kept on this device; it uploads when the link is back.')).toBeVisible();
  await expect(page.getByTestId('photo-waiting')).toHaveCount(1);
  // The waiting photo is drawn from the image kept on the device (its blob: URL passes the page's policy).
  await expect.poll(() => page.getByTestId('photo-waiting').locator('img').evaluate((img: HTMLImageElement) => img.naturalWidth)).toBe(64);
  await expect(field.outboxCount).toHaveText('1');
  const keptIds = await outboxIds(page, 'photos');
  expect(keptIds).toHaveLength(1);
  expect(await photosStored()).toHaveLength(0); // the test's own request context is not cut off

  const reloaded = await page.reload();
  expect(reloaded?.fromServiceWorker(), 'the page came from the service worker').toBe(true);
  await expect(field.linkState('offline')).toBeVisible();
  await expect(page.getByTestId('photo-waiting')).toHaveCount(1);

  await tech.context.setOffline(false);
  await expect(field.linkState('live')).toBeVisible({ timeout: 20_000 });
  await expect(page.getByTestId('photo-waiting')).toHaveCount(0, { timeout: 20_000 });
  await expect(page.getByTestId('photo')).toHaveCount(1);
  await expect(page.getByRole('img', { name: 'pads before lowering' })).toBeVisible();
  await expect(field.outboxCount).toHaveText('0');
  expect(await outboxIds(page, 'photos')).toEqual([]);

  const stored = await photosStored();
  expect(stored.map((e) => [e.id, e.payload.caption, e.payload.contentType, e.payload.bytes])).toEqual([[keptIds[0], 'pads before lowering', 'image/png', png.byteLength]]);
  const thumb = await page.request.get(`/api/sessions/${sessionId}/photos/${keptIds[0]}?size=thumb`);
  expect([thumb.status(), thumb.headers()['content-type']]).toEqual([200, 'image/webp']);
  await tech.context.close();
});
