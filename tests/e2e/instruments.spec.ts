import { expect, test } from '@playwright/test';
import { InstrumentsPage } from './pages/instruments-page';
import { signedIn } from './pages/personas';

// "%PDF-" opens every PDF file (ISO 32000-1 §7.5.2); the server recognises the type from these bytes.
const pdfBytes = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');

test('an admin uploads a PDF certificate on an instrument’s page, sees it listed, and the download is an attachment', async ({ browser }) => {
  test.setTimeout(180_000); // several pages and round trips; the first visits compile in development mode
  const admin = await signedIn(browser, 'admin', { width: 1024, height: 768 });
  const instruments = new InstrumentsPage(admin.page);
  const serial = `E2E-${Date.now().toString(36).toUpperCase()}`;
  const due = new Date(Date.now() + 200 * 86_400_000).toISOString().slice(0, 10);
  const id = await instruments.addLevel({ model: 'Browser-test level 150 mm', serial, sensitivity: '0.02', unit: 'mm/m', due });

  // Converted for the admin's units (demo admin: inch): 0.02 mm/m = 20 µrad = 0.00020 in/10 in.
  await expect(admin.page.getByTestId('instrument-reading')).toContainText('0.02 mm/m per division (0.00020 in/10 in)');
  await expect(instruments.certificate()).toHaveText('No certificate on file.');

  // A page named .pdf is refused, with the problem named and nothing stored.
  await instruments.uploadCertificate({ name: 'certificate.pdf', mimeType: 'application/pdf', buffer: Buffer.from('<!doctype html><script>alert(1)</script>') });
  await expect(admin.page.getByRole('alert').filter({ hasText: 'Not stored: must be a PDF, PNG, JPEG or WebP file' })).toBeVisible();
  await expect(instruments.certificate()).toHaveText('No certificate on file.');

  await instruments.uploadCertificate({ name: 'LV calibration 2026.pdf', mimeType: 'application/pdf', buffer: pdfBytes });
  await expect(admin.page.getByRole('status').filter({ hasText: 'Certificate stored.' })).toBeVisible();
  await expect(instruments.certificate()).toContainText('LV calibration 2026.pdf');
  await expect(instruments.certificate()).toContainText(`${pdfBytes.length} bytes`);

  const row = await instruments.listRow(serial);
  await expect(row.getByRole('link', { name: 'Download' })).toBeVisible();
  await expect(row.locator('[data-status="current"]')).toHaveText('Current');

  const res = await admin.page.request.get(`/api/instruments/${id}/certificate`);
  expect(res.status()).toBe(200);
  expect(res.headers()['content-disposition']).toBe('attachment; filename="LV calibration 2026.pdf"');
  expect(res.headers()['content-type']).toBe('application/pdf');
  expect(res.headers()['x-content-type-options']).toBe('nosniff');
  expect(Buffer.from(await res.body())).toEqual(pdfBytes);

  // Leave the demo list as it was: retire the test instrument.
  await admin.page.goto(`/instruments/${id}`);
  await admin.page.getByRole('button', { name: 'Retire instrument' }).click();
  await admin.page.getByRole('button', { name: 'Yes, retire it' }).click();
  await expect(admin.page.getByText('Retired', { exact: true })).toBeVisible();
  await admin.context.close();
});

test('a technician reads instruments but is offered no upload or change', async ({ browser }) => {
  const tech = await signedIn(browser, 'technician');
  await tech.page.goto('/instruments');
  await expect(tech.page.getByRole('link', { name: 'Add instrument' })).toHaveCount(0);
  await expect(tech.page.locator('[data-status="expired"]').first()).toBeVisible();
  await tech.page.getByRole('link', { name: /Lever test indicator 0.0001 in/ }).click();
  await expect(tech.page.getByRole('heading', { name: 'Calibration certificate' })).toBeVisible();
  await expect(tech.page.getByRole('button', { name: 'Upload certificate' })).toHaveCount(0);
  await expect(tech.page.getByRole('button', { name: 'Save changes' })).toHaveCount(0);
  await tech.context.close();
});

test('an admin who works in inches enters an indicator’s resolution and range in inches; they are stored in µm and mm', async ({ browser }) => {
  const admin = await signedIn(browser, 'admin', { width: 1024, height: 768 });
  const { page } = admin;
  const serial = `E2E-IND-${Date.now().toString(36).toUpperCase()}`;
  await page.goto('/instruments/new');
  await page.getByLabel('Kind').selectOption('indicator');
  await page.getByLabel('Serial').fill(serial);
  await page.getByLabel('Model').fill('Browser-test lever indicator');
  await page.getByLabel('Resolution (in)').fill('0.0001');
  await page.getByLabel('Range (in)').fill('0.02');
  await page.getByLabel('Calibration due').fill(new Date(Date.now() + 100 * 86_400_000).toISOString().slice(0, 10));
  await page.getByRole('button', { name: 'Add instrument' }).click();
  await page.waitForURL(/\/instruments\/[0-9a-f-]{36}$/);
  const id = page.url().split('/instruments/')[1]!;
  // 1 in = 25.4 mm exactly (NIST): 0.0001 in = 2.54 µm, 0.02 in = 0.508 mm.
  const { instrument } = (await (await page.request.get(`/api/instruments/${id}`)).json()) as { instrument: { resolutionUm: number; rangeMm: number } };
  expect(instrument.resolutionUm).toBeCloseTo(2.54, 9);
  expect(instrument.rangeMm).toBeCloseTo(0.508, 9);
  // Shown back in inches on the edit form.
  await expect(page.getByLabel('Resolution (in)')).toHaveValue('0.0001');
  await expect(page.getByLabel('Range (in)')).toHaveValue('0.02');
  await admin.context.close();
});
