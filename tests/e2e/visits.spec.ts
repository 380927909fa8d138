import { expect, test } from '@playwright/test';
import { timeInWords } from '../../lib/fleet/visits';
import { emailOf, signedIn } from './pages/personas';
import { VisitsPage } from './pages/visits-page';

// A machine of the demo fleet (db/seed.ts: serials DEMO-<1000 + 37·i>; i = 3 is a compact drill-tap).
const SERIAL = 'DEMO-1111';

test('an admin schedules a visit through the form; the technician’s notice and reminder arrive in the mailbox', async ({ browser }) => {
  const admin = await signedIn(browser, 'admin', { width: 1024, height: 768 });
  const visits = new VisitsPage(admin.page);
  await visits.open();

  // Two hours from now, to the minute: inside the 24-hour reminder window.
  const at = new Date(Math.ceil((Date.now() + 2 * 3_600_000) / 60_000) * 60_000);
  const words = timeInWords(at);

  // The form refuses a missing machine and time beside the fields, before anything is sent.
  await admin.page.getByRole('form', { name: 'Schedule a visit' }).getByRole('button', { name: 'Schedule visit' }).click();
  await expect(admin.page.getByRole('alert').filter({ hasText: 'Choose a machine' })).toBeVisible();
  await expect(admin.page.getByRole('alert').filter({ hasText: 'Choose a date and time' })).toBeVisible();

  await visits.schedule({ serial: SERIAL, technician: 'Tess Alder', expert: 'Ewan Marsh', at, notes: 'Check the anchoring after the slab repair.' });
  await expect(visits.scheduledNotice()).toContainText('The technician and expert were e-mailed');

  // The list updates without a reload.
  const row = admin.page.getByRole('row').filter({ hasText: SERIAL });
  await expect(row.first()).toBeVisible();

  const tech = emailOf('technician');
  await visits.openMailbox(tech);
  await expect(visits.mail(`Leveling visit scheduled:`).filter({ hasText: words })).toHaveCount(1);
  await expect(visits.mail(words).first()).toContainText(SERIAL);

  await visits.runReminders();
  await admin.page.reload();
  const reminder = visits.mail(`Reminder: leveling visit ${words}`).filter({ hasText: SERIAL });
  await expect(reminder).toHaveCount(1);
  await expect(reminder).toContainText('within the next 24 hours');

  // A second run sends nothing new for this visit.
  await visits.runReminders();
  await admin.page.reload();
  await expect(visits.mail(`Reminder: leveling visit ${words}`).filter({ hasText: SERIAL })).toHaveCount(1);
  await admin.context.close();
});

test('the due list shows overdue machines first and links an admin to the schedule form with the machine chosen', async ({ browser }) => {
  const admin = await signedIn(browser, 'admin', { width: 1024, height: 768 });
  await admin.page.goto('/due');
  const firstStatus = admin.page.getByRole('row').nth(1).locator('[data-status]');
  await expect(firstStatus).toHaveAttribute('data-status', 'overdue');
  await admin.page.getByLabel('Show').selectOption('ok');
  await expect(admin.page.locator('tbody [data-status]').first()).toHaveAttribute('data-status', 'ok');
  const link = admin.page.getByRole('link', { name: 'Schedule visit' }).first();
  const serial = (await link.locator('xpath=ancestor::tr').locator('td').first().locator('.tabular').textContent())!.trim();
  await link.click();
  await expect(admin.page.getByTestId('chosen-machine')).toContainText(serial);
  await admin.context.close();

  const tech = await signedIn(browser, 'technician', { width: 1024, height: 768 });
  await tech.page.goto('/due');
  await expect(tech.page.getByRole('row').nth(1)).toBeVisible();
  await expect(tech.page.getByRole('link', { name: 'Schedule visit' })).toHaveCount(0);
  await tech.context.close();
});

/**
 * Times show in the viewer's own time zone once the page has loaded, not in the server's UTC (the server renders UTC,
 * the browser renders again after hydration).
 */
test('a visit’s time shows in the browser’s own time zone, not the server’s', async ({ browser }) => {
  const admin = await signedIn(browser, 'admin', { width: 1024, height: 768, timezoneId: 'Asia/Kolkata' });
  const { rows } = (await (await admin.page.request.get('/api/visits')).json()) as { rows: { id: string; scheduledFor: string }[] };
  expect(rows.length, 'the demo data has a visit').toBeGreaterThan(0);
  const visit = rows[0]!;
  await admin.page.goto(`/visits/${visit.id}`);
  const shown = admin.page.locator(`time[datetime="${new Date(visit.scheduledFor).toISOString()}"]`).first();
  // Asia/Kolkata is UTC+05:30 all year (IANA time zone database: no daylight saving since 1945), so the wall-clock time
  // is the UTC time plus 5 h 30 min; its minutes differ from the UTC time's, so the UTC text cannot pass by chance.
  const local = new Date(Date.parse(visit.scheduledFor) + 330 * 60_000);
  const hhmm = `${String(local.getUTCHours()).padStart(2, '0')}:${String(local.getUTCMinutes()).padStart(2, '0')}`;
  await expect(shown).toContainText(hhmm);
  await expect(shown).not.toContainText('UTC');
  await admin.context.close();
});
