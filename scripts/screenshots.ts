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

const tech = await signIn('technician', { width: 390, height: 844 });
await tech.getByRole('heading', { name: 'Start leveling a machine' }).waitFor();
await tech.screenshot({ path: `${out}/start-phone.png`, fullPage: true });

// A fresh session on the walkthrough machine, coached by the demo expert.
await tech.getByLabel(/^Find a machine/).fill(DEMO_MACHINE_SERIAL);
const row = tech.getByRole('listitem').filter({ hasText: DEMO_MACHINE_SERIAL });
await row.getByRole('button', { name: /^Start leveling/ }).click();
await row.getByLabel('Ewan Marsh').check();
await row.getByRole('button', { name: /^Open with/ }).click();
await tech.waitForURL(/\/field$/);
const sessionPath = new URL(tech.url()).pathname.replace(/\/field$/, '');
await tech.locator('[data-testid="link-state"][data-link="live"]').waitFor();
await tech.screenshot({ path: `${out}/field-phone-prepare.png` });

// Straight to rough level (the walkthrough skips the earlier stages), and two readings off level.
const panel = tech.getByTestId('stage-panel');
while ((await panel.getAttribute('data-stage')) !== 'rough-level') {
  const from = await panel.getAttribute('data-stage');
  await tech.getByRole('button', { name: 'Next stage' }).click();
  const anyway = tech.getByRole('button', { name: 'Continue anyway' });
  if (await anyway.isVisible().catch(() => false)) await anyway.click();
  await tech.waitForFunction((f) => document.querySelector('[data-testid="stage-panel"]')?.getAttribute('data-stage') !== f, from);
}
for (const [key, div] of [['level:x:0', '4'], ['level:y:0', '-2.5']] as const) {
  await panel.locator(`[data-testid="planned-reading"][data-key="${key}"]`).click();
  await tech.locator('input[name="divisions"]').fill(div);
  await tech.getByRole('button', { name: 'Record reading' }).click();
  await panel.locator(`[data-testid="planned-reading"][data-key="${key}"][data-taken="true"]`).waitFor();
}
await panel.locator('[data-testid="stage-verdict"][data-status="fail"]').waitFor();

// The expert sends the engine's moves; the technician's screen shows them.
const expert = await signIn('expert', { width: 1440, height: 900 });
await expert.goto(`${base}${sessionPath}/coach`);
await expert.locator('[data-testid="link-state"][data-link="live"]').waitFor();
await expert.getByTestId('recommended-move').first().waitFor();
await expert.locator('canvas').waitFor();
await expert.waitForTimeout(1000);
await expert.screenshot({ path: `${out}/coach-recommended.png` });
await expert.getByRole('button', { name: 'Send all recommended' }).click();
await tech.getByTestId('move-card').first().waitFor();
await tech.waitForTimeout(500);
await tech.screenshot({ path: `${out}/field-phone-move.png` });

// The demo session: the virtual technician reads twist; the expert sees tilt and twist on the base model.
const demo = ((await (await expert.request.get(`${base}/api/sessions`)).json()) as { sessions: { id: string; demo: boolean; state: string }[] }).sessions.find(
  (x) => x.demo && x.state === 'live',
);
if (demo) {
  await expert.goto(`${base}/sessions/${demo.id}/coach`);
  const stage = expert.getByTestId('coach-stage');
  for (let i = 0; i < 60 && (await stage.getAttribute('data-stage')) !== 'twist'; i++) {
    const send = expert.getByRole('button', { name: 'Send all recommended' });
    if (await send.isVisible().catch(() => false)) await send.click();
    await expert.waitForTimeout(1500);
  }
  await expert.getByTestId('recommended-move').first().waitFor({ timeout: 30_000 }).catch(() => undefined);
  await expert.waitForTimeout(1500);
  await expert.screenshot({ path: `${out}/coach-desktop.png` });
} else console.log('no live demo session: coach-desktop.png not taken');

console.log('JavaScript each page loads, until the network is idle (gzip -9):');
console.log('  field view', await firstLoadJs(tech, `${sessionPath}/field`));
console.log('  coach view', await firstLoadJs(expert, `${sessionPath}/coach`));
await browser.close();
