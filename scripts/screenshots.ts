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

// The replay of the walkthrough machine's record waiting for review (the seed's demo record): two comments pinned to
// moments, the playhead mid-way through rough level; then the approval form with a typed name and a drawn signature
// (not sent, so the record stays waiting for review).
const reviewer = await signIn('reviewer', { width: 1440, height: 900 });
const records = ((await (await reviewer.request.get(`${base}/api/sessions`)).json()) as { sessions: { id: string; state: string; lastSeq: number; machine: { serial: string } }[] }).sessions
  .filter((x) => x.machine.serial === DEMO_MACHINE_SERIAL && (x.state === 'ended' || x.state === 'in_review'))
  .sort((a, b) => b.lastSeq - a.lastSeq);
let replayPath: string | null = null;
if (records[0]) {
  replayPath = `/sessions/${records[0].id}/replay`;
  await reviewer.goto(`${base}${replayPath}`);
  const readout = reviewer.getByTestId('replay-readout');
  await readout.waitFor({ timeout: 120_000 });
  const marker = (title: string) => reviewer.getByTestId('stage-marker').filter({ hasText: new RegExp(`^${title}`) });
  if ((await reviewer.getByTestId('timeline-pin').count()) === 0) {
    for (const [stage, text] of [
      ['5 Twist', 'Twist came in at the limit on the first round: was the level reversed at the back station?'],
      ['9 Spindle sweep', 'Back reading of the sweep looks high against the others; a photo of the indicator set-up would help.'],
    ] as const) {
      await marker(stage).click();
      for (let i = 0; i < 3; i++) await reviewer.keyboard.press('ArrowRight');
      await reviewer.locator('textarea[name="comment"]').fill(text);
      await reviewer.getByRole('button', { name: /^Pin comment at/ }).click();
      await reviewer.getByTestId('review-comment').filter({ hasText: text.slice(0, 30) }).waitFor();
    }
  }
  await marker('4 Rough level').click();
  for (let i = 0; i < 9; i++) await reviewer.keyboard.press('ArrowRight');
  await reviewer.waitForFunction(() => {
    const seq = document.querySelector('[data-testid="replay-readout"]')?.getAttribute('data-seq');
    return seq !== null && document.querySelector('[data-testid="replay-figures"]')?.getAttribute('data-seq') === seq;
  });
  await reviewer.locator('canvas').first().waitFor();
  await reviewer.waitForTimeout(1500);
  await reviewer.screenshot({ path: `${out}/replay-desktop.png` });

  // The review panel whole, in a window tall enough that the sticky timeline covers none of it.
  await reviewer.setViewportSize({ width: 1440, height: 2200 });
  await reviewer.evaluate(() => window.scrollTo(0, 0));
  await reviewer.locator('input[name="approver-name"]').fill(DEMO_USERS.find((u) => u.role === 'reviewer')!.name);
  const pad = reviewer.getByTestId('signature-pad');
  await reviewer.waitForTimeout(300);
  const box = (await pad.boundingBox())!;
  const at = (fx: number, fy: number) => [box.x + box.width * fx, box.y + box.height * fy] as const;
  for (const stroke of [
    [at(0.08, 0.72), at(0.12, 0.3), at(0.17, 0.7), at(0.22, 0.35), at(0.27, 0.68), at(0.33, 0.4), at(0.38, 0.62)],
    [at(0.45, 0.45), at(0.5, 0.7), at(0.56, 0.32), at(0.62, 0.66), at(0.7, 0.38), at(0.78, 0.6), at(0.86, 0.5)],
    [at(0.1, 0.82), at(0.9, 0.78)],
  ]) {
    await reviewer.mouse.move(...stroke[0]!);
    await reviewer.mouse.down();
    for (const p of stroke.slice(1)) await reviewer.mouse.move(...p, { steps: 8 });
    await reviewer.mouse.up();
  }
  await reviewer.waitForTimeout(300);
  await reviewer.getByTestId('review-panel').screenshot({ path: `${out}/review-approve.png` });
  await reviewer.setViewportSize({ width: 1440, height: 900 });
} else console.log('no record of the walkthrough machine waits for review: replay-desktop.png and review-approve.png not taken');

console.log('JavaScript each page loads, until the network is idle (gzip -9):');
console.log('  field view', await firstLoadJs(tech, `${sessionPath}/field`));
console.log('  coach view', await firstLoadJs(expert, `${sessionPath}/coach`));
if (replayPath) console.log('  replay', await firstLoadJs(reviewer, replayPath));
await browser.close();
