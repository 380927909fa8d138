import { expect, test } from '@playwright/test';
import { DEMO_MACHINE_SERIAL } from '../../db/seed';
import { FieldPage } from './pages/field-page';
import { signedIn } from './pages/personas';

test('a technician calls an expert into a live session from the field view; until then the expert is kept out', async ({ browser }) => {
  const tech = await signedIn(browser, 'technician', { width: 390, height: 844 });
  const expert = await signedIn(browser, 'expert');
  const { rows } = (await (await tech.page.request.get(`/api/machines?q=${DEMO_MACHINE_SERIAL}`)).json()) as { rows: { id: string; serial: string }[] };
  const opened = await tech.page.request.post('/api/sessions', { data: { machineId: rows.find((m) => m.serial === DEMO_MACHINE_SERIAL)!.id } });
  expect(opened.status()).toBe(201);
  const sessionId = ((await opened.json()) as { session: { id: string } }).session.id;

  // Not a participant yet: the log is closed to the expert (403, not 404: the session is of their organisation).
  expect((await expert.page.request.get(`/api/sessions/${sessionId}/events`)).status()).toBe(403);

  const field = new FieldPage(tech.page);
  await field.open(sessionId);
  await expect(field.linkState('live')).toBeVisible();
  await tech.page.getByText('Call someone in').click();
  await tech.page.getByLabel('to coach (expert)').check();
  await tech.page.getByLabel('Person').selectOption({ label: 'Ewan Marsh (expert)' });
  await tech.page.getByRole('button', { name: 'Add to the session' }).click();
  await expect(tech.page.getByRole('status').filter({ hasText: 'Added' })).toBeVisible();

  expect((await expert.page.request.get(`/api/sessions/${sessionId}/events`)).status()).toBe(200);
  await expert.page.goto(`/sessions/${sessionId}/coach`);
  await expect(expert.page.locator('[data-testid="link-state"][data-link="live"]')).toBeVisible();
  await expect(expert.page.getByTestId('recommended-moves')).toBeVisible();

  // Adding the same person twice is refused with the reason.
  await tech.page.getByLabel('Person').selectOption({ index: 0 });
  const again = await tech.page.request.post(`/api/sessions/${sessionId}/participants`, {
    data: { userId: ((await (await expert.page.request.get('/api/me')).json()) as { me: { id: string } }).me.id, part: 'expert' },
  });
  expect(again.status()).toBe(409);

  await tech.context.close();
  await expert.context.close();
});
