import { expect, test, type Browser, type Page } from '@playwright/test';
import { DEMO_MACHINE_SERIAL } from '../../db/seed';
import { SOCKET_PATH } from '../../lib/realtime/contract';
import { CoachPage } from './pages/coach-page';
import { FieldPage } from './pages/field-page';
import { signedIn, type Persona } from './pages/personas';

/**
 * Issue 7, headers: under the Content-Security-Policy the pages send, nothing the app needs is refused. Sign-in, the
 * start page, a field view (its socket, its service worker, and its reload from that worker without a network), a
 * coach view drawing three.js, and a replay run while every CSP violation a page reports, by event or on its console,
 * is collected; the test fails on any.
 */

type Violation = { page: string; what: string };

/** Collects the page's CSP violations from the page's own event and from Chromium's console, across navigations. */
async function watchViolations(page: Page, into: Violation[]) {
  await page.exposeFunction('__levelwireCspViolation', (what: string) => into.push({ page: page.url(), what }));
  await page.addInitScript(() => {
    document.addEventListener(
      'securitypolicyviolation',
      (e) => void (window as unknown as { __levelwireCspViolation: (s: string) => void }).__levelwireCspViolation(`${e.effectiveDirective} refused ${e.blockedURI || 'inline'} ${e.sample}`),
      true,
    );
  });
  page.on('console', (msg) => {
    if (/content security policy/i.test(msg.text())) into.push({ page: page.url(), what: msg.text() });
  });
}

/** A fresh context, watched from its first page, signed in as one of the demo personas. */
const signedInWatched = (browser: Browser, role: Persona, into: Violation[], viewport?: { width: number; height: number }) =>
  signedIn(browser, role, viewport, (page) => watchViolations(page, into));

test('sign-in, start, field (online and offline), coach and replay pages run under the policy with no violation', async ({ browser }) => {
  test.setTimeout(180_000);
  const violations: Violation[] = [];
  /** Fails at the step that met a violation, naming it. */
  const noneSoFar = (step: string) => expect(violations, `CSP violations by the end of: ${step}`).toEqual([]);

  // The sign-in page: its policy names a nonce; its form's script runs (a refusal is drawn by it).
  const visitor = await browser.newContext();
  const signIn = await visitor.newPage();
  await watchViolations(signIn, violations);
  const response = await signIn.goto('/sign-in');
  expect(response!.headers()['content-security-policy']).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+' 'strict-dynamic'/);
  await signIn.getByLabel('E-mail').fill('nobody@northmere.test');
  await signIn.getByLabel('Password').fill('not-the-password');
  await signIn.getByRole('button', { name: 'Sign in' }).click();
  await expect(signIn.getByRole('alert')).toBeVisible();
  await visitor.close();
  noneSoFar('sign-in');

  const tech = await signedInWatched(browser, 'technician', violations, { width: 412, height: 915 });
  const expert = await signedInWatched(browser, 'expert', violations);
  const reviewer = await signedInWatched(browser, 'reviewer', violations);

  // The start page: the machine picker runs in the browser.
  const page = tech.page;
  await page.goto('/');
  await page.getByText(/^(Showing \d+ of|\d+ machines?\.)/).waitFor();
  noneSoFar('the start page');

  // A field view of a new session: its socket reaches the server over a WebSocket, its service worker registers.
  const { rows } = (await (await page.request.get(`/api/machines?q=${DEMO_MACHINE_SERIAL}`)).json()) as { rows: { id: string; serial: string }[] };
  const expertId = ((await (await expert.page.request.get('/api/me')).json()) as { me: { id: string } }).me.id;
  const opened = await page.request.post('/api/sessions', { data: { machineId: rows.find((m) => m.serial === DEMO_MACHINE_SERIAL)!.id, experts: [expertId] } });
  expect(opened.status()).toBe(201);
  const sessionId = ((await opened.json()) as { session: { id: string } }).session.id;

  const field = new FieldPage(page);
  const socketOpened = page.waitForEvent('websocket', (ws) => new URL(ws.url()).pathname.startsWith(SOCKET_PATH));
  await page.goto(`/sessions/${sessionId}/field`);
  await expect(field.linkState('live')).toBeVisible();
  const ws = await socketOpened;
  expect(new URL(ws.url()).protocol).toBe('ws:');
  await ws.waitForEvent('framereceived');
  await page.waitForFunction(() => navigator.serviceWorker.controller !== null, undefined, { timeout: 20_000 });
  noneSoFar('the field view');

  // Without a network the worker serves the page it cached, with the policy that came with it: the nonce in the cached
  // header is the one on the cached page's scripts, so they run (the page hydrates and shows it is offline).
  await tech.context.setOffline(true);
  const reloaded = await page.reload();
  expect(reloaded?.fromServiceWorker()).toBe(true);
  const cachedPolicy = reloaded!.headers()['content-security-policy'] ?? '';
  const cachedNonce = /'nonce-([^']+)'/.exec(cachedPolicy)?.[1];
  expect(cachedNonce).toBeTruthy();
  expect(await page.locator('script[src]').evaluateAll((s) => s.map((e) => (e as HTMLScriptElement).nonce))).toEqual(expect.arrayContaining([cachedNonce]));
  await expect(field.linkState('offline')).toBeVisible();
  await expect(field.stagePanel).toBeVisible();
  await tech.context.setOffline(false);
  await expect(field.linkState('live')).toBeVisible({ timeout: 20_000 });
  noneSoFar('the field view reloaded offline');

  // The coach view draws the machine with three.js (WebGL), loaded on demand.
  const coach = new CoachPage(expert.page);
  await coach.goto(sessionId);
  await expect(expert.page.locator('canvas')).toBeVisible();
  await expect(expert.page.getByText('This browser could not start 3D drawing')).toHaveCount(0);
  noneSoFar('the coach view');

  // The reviewer replays one of the demo's approved records: its tilt view, timeline and player.
  const { sessions } = (await (await reviewer.page.request.get('/api/sessions')).json()) as { sessions: { id: string; state: string }[] };
  const record = sessions.find((s) => s.state === 'approved');
  expect(record, 'the demo has an approved record').toBeTruthy();
  await reviewer.page.goto(`/sessions/${record!.id}/replay`);
  const readout = reviewer.page.getByTestId('replay-readout');
  await expect(readout).toHaveAttribute('data-seq', /^[1-9]\d*$/, { timeout: 30_000 });
  await expect(reviewer.page.locator('canvas')).toBeVisible();
  await reviewer.page.getByRole('button', { name: '1×' }).click();
  await reviewer.page.keyboard.press('Home');
  await expect(readout).toHaveAttribute('data-seq', '0');
  await reviewer.page.getByRole('button', { name: 'Play' }).click();
  await expect.poll(async () => Number(await readout.getAttribute('data-seq')), { timeout: 15_000 }).toBeGreaterThan(0);

  for (const s of [tech, expert, reviewer]) await s.context.close();
  noneSoFar('the replay');
});
