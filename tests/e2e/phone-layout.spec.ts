import { expect, test } from '@playwright/test';
import { signedIn } from './pages/personas';

/**
 * On a phone (390 px wide) no page scrolls sideways: wide content (tables) scrolls inside its own box, and nothing
 * (a file input, a hidden table header) pushes the page past the screen.
 */
test('no page scrolls sideways on a 390 px phone', async ({ browser }) => {
  const { context, page } = await signedIn(browser, 'admin', { width: 390, height: 844 });
  const first = async (url: string) => (((await (await page.request.get(url)).json()) as { rows: { id: string }[] }).rows[0]?.id ?? null);
  const [instrument, machine, visit] = await Promise.all([first('/api/instruments'), first('/api/machines'), first('/api/visits')]);
  expect([instrument, machine, visit].every(Boolean), 'the demo data has an instrument, a machine and a visit').toBe(true);
  const paths = [
    '/',
    '/fleet',
    '/fleet/customers',
    '/fleet/machines/new',
    `/fleet/machines/${machine}`,
    '/due',
    '/visits',
    `/visits/${visit}`,
    '/instruments',
    '/instruments/new',
    `/instruments/${instrument}`,
    '/sessions/import',
    '/admin/users',
    '/settings',
  ];
  const wide: string[] = [];
  for (const path of paths) {
    await page.goto(path);
    await page.waitForLoadState('networkidle');
    const width = await page.evaluate(() => document.documentElement.scrollWidth);
    if (width > 390) wide.push(`${path}: ${width} px`);
  }
  expect(wide).toEqual([]);
  await context.close();
});
