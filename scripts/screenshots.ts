// Screenshots of the main screens against a running server (default http://127.0.0.1:3000, the `npm start` one):
// `npx tsx scripts/screenshots.ts [url]` writes docs/screenshots/*.png and prints each page's first-load JS.
import { mkdirSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { chromium, type Page } from 'playwright-core';
import { DEMO_MACHINE_SERIAL, DEMO_PASSWORD, DEMO_USERS } from '../db/seed';

const base = process.argv[2] ?? 'http://127.0.0.1:3000';
const out = 'docs/screenshots';
mkdirSync(out, { recursive: true });

const browser = await chromium.launch({
  executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});

async function signIn(role: string, viewport: { width: number; height: number }): Promise<Page> {
  const context = await browser.newContext({ viewport, baseURL: base });
  const page = await context.newPage();
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(DEMO_USERS.find((u) => u.role === role)!.email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
  return page;
}

/** Loads a path in a fresh page of the same context and sums its JavaScript, gzipped (level 9) as it would travel. */
async function firstLoadJs(page: Page, path: string): Promise<{ gzipKB: number; scripts: number; three: boolean }> {
  const p = await page.context().newPage();
  const bodies: Promise<Buffer | null>[] = [];
  p.on('response', (res) => {
    if (res.request().resourceType() === 'script') bodies.push(res.body().catch(() => null));
  });
  await p.goto(path, { waitUntil: 'networkidle' });
  const scripts = (await Promise.all(bodies)).filter((b): b is Buffer => b !== null);
  await p.close();
  const gzip = scripts.reduce((a, b) => a + gzipSync(b, { level: 9 }).length, 0);
  return { gzipKB: Math.round(gzip / 102.4) / 10, scripts: scripts.length, three: scripts.some((b) => b.includes('WebGLRenderer')) };
}

const signInPage = await (await browser.newContext({ viewport: { width: 1280, height: 800 } })).newPage();
await signInPage.goto(`${base}/sign-in`);
await signInPage.screenshot({ path: `${out}/sign-in.png` });

const tech = await signIn('technician', { width: 412, height: 915 });
await tech.getByRole('heading', { name: 'Start leveling a machine' }).waitFor();
await tech.screenshot({ path: `${out}/start-phone.png`, fullPage: true });
await tech.getByLabel(/^Find a machine/).fill(DEMO_MACHINE_SERIAL);
await tech.getByRole('listitem').filter({ hasText: DEMO_MACHINE_SERIAL }).getByRole('button', { name: /^Start leveling/ }).click();
await tech.getByRole('listitem').filter({ hasText: DEMO_MACHINE_SERIAL }).getByRole('button', { name: /^Open (with|without)/ }).click();
await tech.waitForURL(/\/field$/);
const sessionPath = new URL(tech.url()).pathname.replace(/\/field$/, '');
for (const [axis, station, div] of [['X', 'Front', '1.5'], ['X', 'Back', '-0.5'], ['Y', 'Middle', '-2']] as const) {
  await tech.getByRole('button', { name: new RegExp(`^${axis} · `) }).click();
  await tech.getByRole('button', { name: new RegExp(`^${station}`) }).click();
  await tech.getByLabel('or type divisions').fill(div);
  await tech.getByRole('button', { name: 'Record reading' }).click();
  await tech.getByRole('status').filter({ hasText: 'Reading stored' }).waitFor();
}
await tech.getByRole('slider').click({ position: { x: 250, y: 40 } });
await tech.screenshot({ path: `${out}/field-phone.png`, fullPage: true });

const expert = await signIn('expert', { width: 1440, height: 900 });
await expert.goto(`${base}${sessionPath}/coach`);
await expert.locator('[data-link="live"]').waitFor();
await expert.locator('canvas').waitFor();
await expert.waitForTimeout(1500);
await expert.screenshot({ path: `${out}/coach-desktop.png` });

console.log('JavaScript each page loads, until the network is idle (gzip -9):');
console.log('  field view', await firstLoadJs(tech, `${sessionPath}/field`));
console.log('  coach view', await firstLoadJs(expert, `${sessionPath}/coach`));
await browser.close();
