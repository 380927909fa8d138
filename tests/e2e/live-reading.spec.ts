import { expect, test } from '@playwright/test';
import { FieldPage } from './pages/field-page';
import { signedIn } from './pages/personas';

test('a reading travels live from the field view to the coach view and survives a reload', async ({ browser }) => {
  const tech = await signedIn(browser, 'technician', { width: 412, height: 915 });
  const field = new FieldPage(tech.page);
  const sessionId = await field.openNewSession();

  const expert = await signedIn(browser, 'expert');
  await expert.page.goto(`/sessions/${sessionId}/coach`);
  await expect(expert.page.locator('[data-link="live"]')).toBeVisible();
  await expect(expert.page.getByTestId('slope-x')).toHaveText('—');

  await field.record('x', 'Front', '1.5');
  const stored = tech.page.getByRole('status').filter({ hasText: /Reading stored as #\d+/ });
  await expect(stored).toBeVisible();
  const seq = (await stored.textContent())!.match(/#(\d+)/)![1];

  // The expert sees it without reloading: in the feed and as the X slope (1.5 div × 20 µrad = 30 µrad = 0.00030 in/10 in).
  // The demo people work in inches: the front station, -250 mm, shows as -9.8 in (1 in = 25.4 mm, NIST).
  const feed = expert.page.getByTestId('reading-feed');
  await expect(feed.getByText(`#${seq} X @ -9.8 in`)).toBeVisible({ timeout: 1_000 });
  await expect(expert.page.getByTestId('slope-x')).toHaveText('0.00030 in/10 in');
  await expect(expert.page.locator('canvas')).toBeVisible();

  await expert.page.reload();
  await expect(expert.page.getByTestId('reading-feed').getByText(`#${seq} X @ -9.8 in`)).toBeVisible();

  await tech.context.close();
  await expert.context.close();
});

test('a malformed reading is refused with the field named, and nothing is stored', async ({ browser }) => {
  const tech = await signedIn(browser, 'technician');
  const field = new FieldPage(tech.page);
  const sessionId = await field.openNewSession();

  // The form checks with the same schema as the server: the field is named before anything is sent.
  await field.record('y', 'Middle', 'abc');
  await expect(tech.page.getByRole('alert').filter({ hasText: 'divisions: must be a number' })).toBeVisible();
  await field.record('y', 'Middle', '250');
  await expect(tech.page.getByRole('alert').filter({ hasText: 'divisions: must be within ±100' })).toBeVisible();

  const res = await tech.page.request.get(`/api/sessions/${sessionId}/events`);
  const { events } = (await res.json()) as { events: { type: string }[] };
  expect(events.map((e) => e.type).filter((t) => t === 'reading:recorded')).toEqual([]);
  await tech.context.close();
});

test('a reviewer may watch a session but is refused when posting a reading', async ({ browser }) => {
  const tech = await signedIn(browser, 'technician');
  const sessionId = await new FieldPage(tech.page).openNewSession();

  const reviewer = await signedIn(browser, 'reviewer');
  await reviewer.page.goto(`/sessions/${sessionId}/field`);
  await expect(reviewer.page).toHaveURL(new RegExp(`/sessions/${sessionId}/coach$`));

  const res = await reviewer.page.request.post(`/api/sessions/${sessionId}/readings`, {
    data: { id: crypto.randomUUID(), reading: { kind: 'level', axis: 'x', positionMm: 0, divisions: 1 } },
  });
  expect(res.status()).toBe(403);
  expect(((await res.json()) as { code: string }).code).toBe('forbidden:reading');

  await tech.context.close();
  await reviewer.context.close();
});

test('a signed-out visitor is sent to sign-in, and the API answers 401', async ({ page }) => {
  await page.goto('/');
  await expect(page).toHaveURL(/\/sign-in\?callbackUrl=%2F$/);
  const res = await page.request.get('/api/sessions');
  expect(res.status()).toBe(401);
});

test('signing out ends the session: pages go back to sign-in and the API answers 401', async ({ browser }) => {
  const { context, page } = await signedIn(browser, 'expert');
  expect((await page.request.get('/api/sessions')).status()).toBe(200);
  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL(/\/sign-in/);
  expect((await page.request.get('/api/sessions')).status()).toBe(401);
  await page.goto('/fleet');
  await expect(page).toHaveURL(/\/sign-in\?callbackUrl=/);
  await context.close();
});
