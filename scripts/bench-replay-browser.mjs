// The replay in a real browser (Debian's chromium, headless) against a running production server: time to the first
// frame and seek times, with a plain click on the same page as the baseline. Not part of `npm test`.
//   npm run bench:replay -- --save=/tmp/log.json   then import /tmp/log.json as the demo admin at /sessions/import
//   node scripts/bench-replay-browser.mjs --session=<id> [--url=http://127.0.0.1:3000] [--email=… --password=…]
import { chromium } from 'playwright-core';
const arg = (name, fallback) => process.argv.find((a) => a.startsWith(`--${name}=`))?.slice(name.length + 3) ?? fallback;
const SID = arg('session');
if (!SID) throw new Error('--session=<id> of a session the user may read');
const URL0 = arg('url', 'http://127.0.0.1:3000');
const EMAIL = arg('email', 'reviewer@northmere.test');
const PASSWORD = arg('password', 'level-demo-2026');
const b = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium' });
const p = await b.newPage({ viewport: { width: 1440, height: 900 } });
await p.goto(`${URL0}/sign-in`);
await p.fill('input[name=email]', EMAIL);
await p.fill('input[name=password]', PASSWORD);
await p.click('button[type=submit]');
await p.waitForURL(`${URL0}/`);
const loads = [];
for (let r = 0; r < 3; r++) {
  const t0 = Date.now();
  await p.goto(`${URL0}/sessions/${SID}/replay`);
  await p.getByTestId('replay-readout').filter({ hasText: / of \d+ · / }).waitFor({ timeout: 120000 });
  const t1 = Date.now();
  await p.waitForFunction(() => { const f = document.querySelector('[data-testid=replay-figures]'); const r = document.querySelector('[data-testid=replay-readout]'); return f && r && f.getAttribute('data-seq') === r.getAttribute('data-seq'); }, null, { polling: 'raf', timeout: 60000 });
  loads.push([t1 - t0, Date.now() - t0]);
}
console.log('load to readout / to figures (ms):', JSON.stringify(loads));
const box = await p.getByTestId('scrubber').boundingBox();
const moment = [], figures = [];
for (let i = 0; i < 25; i++) {
  const prev = await p.getByTestId('replay-readout').getAttribute('data-seq');
  const x = box.x + box.width * ((i * 0.37) % 1);
  const t0 = Date.now();
  await p.mouse.click(x, box.y + box.height / 2);
  await p.waitForFunction((prev) => { const r = document.querySelector('[data-testid=replay-readout]'); const m = document.querySelector('[data-testid=replay-moment]'); return r.getAttribute('data-seq') !== prev && m.getAttribute('data-seq') === r.getAttribute('data-seq'); }, prev, { polling: 'raf', timeout: 30000 }).catch(() => {});
  const t1 = Date.now();
  await p.waitForFunction(() => { const f = document.querySelector('[data-testid=replay-figures]'); const r = document.querySelector('[data-testid=replay-readout]'); return f.getAttribute('data-seq') === r.getAttribute('data-seq'); }, null, { polling: 'raf', timeout: 30000 });
  moment.push(t1 - t0); figures.push(Date.now() - t0);
}
// Baseline in the same page: the speed buttons (a click that re-renders only the bar).
const base = [];
for (let i = 0; i < 25; i++) {
  const name = i % 2 ? '1×' : '16×';
  const t0 = Date.now();
  await p.getByRole('button', { name, exact: true }).click();
  await p.waitForFunction((name) => [...document.querySelectorAll('button')].some((b) => b.textContent === name && b.getAttribute('aria-pressed') === 'true'), name, { polling: 'raf', timeout: 30000 });
  base.push(Date.now() - t0);
}
const q = (xs, f) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(xs.length * f))];
console.log('seek → moment shown ms: p50', q(moment, 0.5), 'p95', q(moment, 0.95), 'max', Math.max(...moment));
console.log('seek → figures (model, chart, tilt view) ms: p50', q(figures, 0.5), 'p95', q(figures, 0.95), 'max', Math.max(...figures));
console.log('baseline click → speed shown ms: p50', q(base, 0.5), 'p95', q(base, 0.95));
await b.close();
