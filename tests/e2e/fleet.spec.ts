import { expect, test } from '@playwright/test';
import { CSV_COLUMNS } from '../../lib/fleet/machines-csv';
import { FleetPage } from './pages/fleet-page';
import { signedIn } from './pages/personas';

test('an admin lays out a footprint in the editor, is stopped by an impossible layout, fixes it and saves', async ({ browser }) => {
  const { context, page } = await signedIn(browser, 'admin', { width: 1280, height: 1000 });
  const fleet = new FleetPage(page);
  const serial = `E2E-${Date.now().toString(36)}`;
  await fleet.openNewMachine();
  await fleet.fillMachine({ model: 'Browser-test VMC (demo)', serial, lengths: [40, 20, 32, 20, 22] });
  await page.getByRole('button', { name: '6-screw layout' }).click();
  await expect(fleet.screw('ML')).toBeVisible();

  // Dragging a screw moves its coordinates (the demo admin works in inches).
  const before = await page.getByLabel('Screw 5 y').inputValue();
  await fleet.dragScrew('ML', 0, -60);
  await expect(page.getByLabel('Screw 5 y')).not.toHaveValue(before);

  // Typing FR onto FL: two pads cannot share a spot.
  await page.getByLabel('Screw 2 x').fill(await page.getByLabel('Screw 1 x').inputValue());
  await page.getByLabel('Screw 2 y').fill(await page.getByLabel('Screw 1 y').inputValue());
  await expect(page.getByRole('alert').filter({ hasText: /FR · xMm: FR is 0 mm from FL; screws must be at least 50 mm apart/ })).toBeVisible();
  await page.getByRole('button', { name: 'Add machine' }).click();
  await expect(page).toHaveURL(/\/fleet\/machines\/new$/);

  // Put FR back on the right and save.
  await page.getByLabel('Screw 2 x').fill('30');
  await expect(page.getByRole('alert').filter({ hasText: 'FR is' })).toHaveCount(0);
  await page.getByRole('button', { name: 'Add machine' }).click();
  await page.waitForURL(/\/fleet\/machines\/[0-9a-f-]{36}$/);
  await expect(page.getByRole('heading', { name: new RegExp(serial) })).toBeVisible();
  await expect(page.locator('[data-screw]')).toHaveCount(6);
  await expect(page.getByLabel('Screw 2 x')).toHaveValue('30');
  await context.close();
});

test('a machine CSV with a bad row is refused whole, naming the line and column', async ({ browser }) => {
  const { context, page } = await signedIn(browser, 'admin');
  const fleet = new FleetPage(page);
  const serial = `CSV-${Date.now().toString(36)}`;
  const row = (label: string, kind: string, x: number, y: number) =>
    [serial, 'CSV VMC (demo)', 'Ashgrove Tooling Co-op (demo)', '"Ashgrove works, bay C"', 1000, 500, 800, 500, 500, 9, '', label, kind, x, y, 'mm', 3, '', 80].join(',');
  const bad = [CSV_COLUMNS.join(','), row('FL', 'corner', -900, -700), row('FR', 'leg', 900, -700), row('RL', 'corner', -900, 700), row('RR', 'corner', 900, 700)].join('\n');
  await fleet.importCsv('machines.csv', bad);
  const alert = page.getByRole('alert').filter({ hasText: 'Nothing was imported' });
  await expect(alert.getByRole('listitem')).toHaveText(['line 3, screw_kind: must be corner, middle or outrigger']);
  await page.getByLabel('Filter by model, serial, customer or site').fill(serial);
  await expect(page.getByRole('status').filter({ hasText: /in all/ })).toHaveText(/^0 in all/);

  // The same file with the row mended goes in whole.
  await fleet.importCsv('machines.csv', bad.replace(',leg,', ',corner,'));
  await expect(page.getByRole('status').filter({ hasText: 'Imported' })).toHaveText('Imported: 1 new, 0 updated.');
  await page.getByLabel('Filter by model, serial, customer or site').fill(serial);
  await expect(page.getByRole('status').filter({ hasText: /in all/ })).toHaveText(/^1 in all/);
  await expect(page.getByRole('row').filter({ hasText: serial })).toContainText('CSV VMC (demo)');
  await context.close();
});

test('an admin edits a site’s floor notes on the customer page and the change is kept', async ({ browser }) => {
  const { context, page } = await signedIn(browser, 'admin');
  const note = `Slab re-poured, re-check in 3 months (${Date.now().toString(36)})`;
  await page.goto('/fleet/customers');
  await page.getByRole('link', { name: /Ashgrove Tooling Co-op/ }).click();
  const site = page.getByRole('listitem').filter({ hasText: 'Ashgrove annexe' });
  await site.getByText('Edit', { exact: true }).click();
  await site.getByLabel('Floor and foundation').fill(note);
  await site.getByRole('button', { name: 'Save site' }).click();
  await expect(site.getByRole('status')).toHaveText('Saved.');
  await page.reload();
  await expect(page.getByRole('listitem').filter({ hasText: 'Ashgrove annexe' })).toContainText(note);
  await context.close();
});
