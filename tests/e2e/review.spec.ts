import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { PDFParse } from 'pdf-parse';
import { formatLength, formatSlope, type UnitSystem } from '../../lib/leveling/units';
import type { SessionEvent } from '../../lib/session/events';
import { foldEvents, type SessionState } from '../../lib/session/fold';
import { summarizeSession } from '../../lib/session/summary';
import { readMail } from './pages/admin-page';
import { signedIn } from './pages/personas';
import { cookieHeader, workSessionToEnd, type WorkedSession } from './pages/session-driver';

/**
 * The record's review, by three people: a session worked to its end (the technician and the expert over sockets, off
 * a seeded virtual machine), then the reviewer replays it, seeks, pins a comment and returns it; the technician's field
 * view shows the return live, the technician takes it up again, retakes an as-left reading and finishes; the reviewer
 * approves with a typed name and a drawn signature. Each step is a small helper, so later steps (the report) append.
 */

type Ctx = { sessionId: string; worked: WorkedSession };

const readout = (page: Page) => page.getByTestId('replay-readout');
const shownSeq = async (page: Page) => Number(await readout(page).getAttribute('data-seq'));
/** The tilt view, base model and charts follow the playhead as a deferred value: wait until they show its moment. */
const figuresSettled = async (page: Page) => expect(page.getByTestId('replay-figures')).toHaveAttribute('data-seq', String(await shownSeq(page)));
const statusChip = (page: Page) => page.getByTestId('review-panel').getByTestId('record-status');

/** Opens a session on a six-screw demo machine with the demo expert and works it to its end. */
async function sessionWorkedToEnd(tech: Page, expert: Page): Promise<Ctx> {
  const machines = (await (await tech.request.get('/api/machines?pageSize=100')).json()) as { rows: { id: string; screwCount: number }[] };
  const machine = machines.rows.find((m) => m.screwCount === 6);
  expect(machine, 'the demo fleet has a six-screw machine').toBeTruthy();
  const expertId = ((await (await expert.request.get('/api/me')).json()) as { me: { id: string } }).me.id;
  const opened = await tech.request.post('/api/sessions', { data: { machineId: machine!.id, experts: [expertId] } });
  expect(opened.status()).toBe(201);
  const sessionId = ((await opened.json()) as { session: { id: string } }).session.id;
  const worked = await workSessionToEnd({
    baseURL: new URL(tech.url()).origin,
    sessionId,
    tech: cookieHeader(await tech.context().cookies()),
    expert: cookieHeader(await expert.context().cookies()),
    seed: 20261203,
    notes: true,
  });
  expect(worked.state.ended).not.toBeNull();
  return { sessionId, worked };
}

/** The reviewer finds the session waiting for review on the start page and opens its replay. */
async function reviewerOpensReplay(page: Page, { sessionId, worked }: Ctx) {
  await page.goto('/');
  await page.getByTestId('awaiting-review').locator(`a[href="/sessions/${sessionId}/replay"]`).click();
  await page.waitForURL(`**/sessions/${sessionId}/replay`);
  // The replay opens on the record as it stands: its last event.
  await expect(readout(page)).toHaveText(new RegExp(`^seq ${worked.state.seq} of ${worked.state.seq} · \\d\\d:\\d\\d:\\d\\d$`), { timeout: 60_000 });
  await expect(statusChip(page)).toHaveAttribute('data-status', 'ended');
}

/** Plays from the start at 1× and pauses; the playhead moved and stays put once paused. */
async function plays(page: Page) {
  await page.getByRole('button', { name: '1×' }).click();
  await page.keyboard.press('Home');
  await expect(readout(page)).toHaveAttribute('data-seq', '0');
  await page.getByRole('button', { name: 'Play' }).click();
  await expect.poll(() => shownSeq(page), { timeout: 15_000 }).toBeGreaterThan(3);
  const pause = page.getByRole('button', { name: 'Pause' });
  if (await pause.isVisible()) await pause.click();
  await expect(page.getByRole('button', { name: 'Play' })).toBeVisible();
  const held = await shownSeq(page);
  await page.waitForTimeout(600);
  expect(await shownSeq(page)).toBe(held);
}

/** Seeks by a stage marker, by the keyboard and by a click on the scrubber; the moment's figures follow. */
async function seeks(page: Page, { worked }: Ctx) {
  const feed = page.getByTestId('reading-feed').locator('li');
  const markerOf = (title: string) => page.getByTestId('stage-marker').filter({ hasText: title });

  const rough = markerOf('Rough level');
  const roughSeq = Number(await rough.getAttribute('data-seq'));
  expect(roughSeq).toBe(worked.state.stageLog.find((s) => s.stage === 'rough-level')!.seq);
  await rough.click();
  await expect(readout(page)).toHaveAttribute('data-seq', String(roughSeq));
  await expect(readout(page)).toContainText(`seq ${roughSeq} of ${worked.state.seq}`);
  const readingsAtRough = worked.state.readings.filter((r) => r.seq <= roughSeq).length;
  await expect(feed.filter({ hasText: '#' })).toHaveCount(Math.min(50, readingsAtRough));
  await figuresSettled(page);
  const modelAtRough = await page.getByTestId('base-numbers').innerText();

  const last = markerOf('Lock and as-left');
  const lastSeq = Number(await last.getAttribute('data-seq'));
  await last.click();
  await expect(readout(page)).toHaveAttribute('data-seq', String(lastSeq));
  await expect(feed.filter({ hasText: '#' })).toHaveCount(Math.min(50, worked.state.readings.filter((r) => r.seq <= lastSeq).length));
  await figuresSettled(page);
  expect(await page.getByTestId('base-numbers').innerText()).not.toBe(modelAtRough);

  // One event back with the keyboard.
  await page.keyboard.press('ArrowLeft');
  await expect(readout(page)).toHaveAttribute('data-seq', String(lastSeq - 1));

  // A click a fifth of the way along the scrubber shows an earlier moment than the as-left stage.
  const box = (await page.getByTestId('scrubber').boundingBox())!;
  await page.mouse.click(box.x + box.width * 0.2, box.y + box.height / 2);
  await expect.poll(() => shownSeq(page)).toBeLessThan(lastSeq);
  const clicked = await shownSeq(page);
  expect(clicked).toBeGreaterThan(0);
  await expect(page.getByTestId('scrubber')).toHaveAttribute('aria-valuenow', String(clicked));
}

/** Pins a comment at the twist stage's start; it is listed, pinned on the timeline, and a click on it seeks back there. */
async function pinsComment(page: Page, text: string): Promise<number> {
  const twist = page.getByTestId('stage-marker').filter({ hasText: /^5 Twist/ });
  const at = Number(await twist.getAttribute('data-seq'));
  await twist.click();
  await expect(readout(page)).toHaveAttribute('data-seq', String(at));
  await page.locator('textarea[name="comment"]').fill(text);
  await page.getByRole('button', { name: `Pin comment at #${at}` }).click();
  const listed = page.getByTestId('review-comment').filter({ hasText: text });
  await expect(listed).toHaveAttribute('data-at-seq', String(at));
  await expect(page.locator(`[data-testid="timeline-pin"][data-at-seq="${at}"]`)).toBeVisible();
  await expect(statusChip(page)).toHaveAttribute('data-status', 'in_review');
  await page.keyboard.press('End');
  await expect.poll(() => shownSeq(page)).toBeGreaterThan(at);
  await listed.click();
  await expect(readout(page)).toHaveAttribute('data-seq', String(at));
  return at;
}

/** Returns the record for rework; an empty reason is refused first, naming the field. */
async function returnsForRework(page: Page, reason: string) {
  await page.getByRole('button', { name: 'Return for rework' }).click();
  await expect(page.getByText('Reason 1: must not be empty')).toBeVisible();
  await page.locator('input[name="reason-0"]').fill(reason);
  await page.getByRole('button', { name: 'Return for rework' }).click();
  await expect(statusChip(page)).toHaveAttribute('data-status', 'returned');
  await expect(page.getByTestId('return').filter({ hasText: reason })).toBeVisible();
}

/** The technician's field view, open all along, shows the return as it happens. */
async function fieldShowsReturn(field: Page, reason: string) {
  const banner = field.getByTestId('returned-banner');
  await expect(banner).toBeVisible({ timeout: 20_000 });
  await expect(banner.getByTestId('return-reasons')).toContainText(reason);
}

/** From the start page (marked returned) through the session page to the field view, and takes it up again. */
async function technicianTakesItUp(field: Page, sessionId: string) {
  await field.goto('/');
  const row = field.getByTestId('session-row').filter({ has: field.locator(`a[href="/sessions/${sessionId}"]`) });
  await expect(row.getByTestId('returned-marker')).toBeVisible();
  await row.locator(`a[href="/sessions/${sessionId}"]`).click();
  await field.waitForURL((u) => u.pathname === `/sessions/${sessionId}`);
  await expect(field.getByTestId('returned-marker')).toBeVisible();
  await field.getByRole('link', { name: 'Open the field view to take it up again' }).click();
  await field.waitForURL(`**/sessions/${sessionId}/field`);
  await expect(field.locator('[data-testid="link-state"][data-link="live"]')).toBeVisible({ timeout: 30_000 });
  await field.getByRole('button', { name: 'Take it up again' }).click();
  await expect(field.getByTestId('returned-banner')).toHaveCount(0, { timeout: 15_000 });
  await expect(field.getByRole('button', { name: 'Record reading' })).toBeVisible();
}

/** Retakes one as-left level reading off the virtual machine and finishes again. */
async function retakesAsLeftAndFinishes(field: Page, { worked }: Ctx) {
  const panel = field.getByTestId('stage-panel');
  await expect(panel).toHaveAttribute('data-stage', 'lock-as-left');
  const planned = panel.locator('[data-testid="planned-reading"][data-key^="level:y:"]').first();
  const [, axis, pos] = (await planned.getAttribute('data-key'))!.split(':');
  await planned.click();
  await field.locator('input[name="divisions"]').fill(String(worked.vm.readLevel(axis as 'x' | 'y', 0, Number(pos))));
  await field.getByRole('button', { name: 'Record reading' }).click();
  await expect(field.getByRole('status').filter({ hasText: /Reading stored as #\d+/ })).toBeVisible({ timeout: 15_000 });
  await field.getByRole('button', { name: /^Finish the session/ }).click();
  const reason = field.locator('input[name="finish-reason"]');
  if ((await field.getByRole('button', { name: 'Finish', exact: true }).isDisabled()) && (await reason.isVisible())) await reason.fill('As-left retaken after the review.');
  await field.getByRole('button', { name: 'Finish', exact: true }).click();
  await expect(field.getByText('This session has ended')).toBeVisible();
}

/** Draws a signature on the pad with the mouse: two strokes. */
async function signs(page: Page) {
  const pad = page.getByTestId('signature-pad');
  await pad.scrollIntoViewIfNeeded();
  const box = (await pad.boundingBox())!;
  const at = (fx: number, fy: number) => [box.x + box.width * fx, box.y + box.height * fy] as const;
  for (const stroke of [
    [at(0.1, 0.7), at(0.2, 0.3), at(0.3, 0.65), at(0.4, 0.35), at(0.5, 0.6)],
    [at(0.55, 0.5), at(0.9, 0.45)],
  ]) {
    await page.mouse.move(...stroke[0]!);
    await page.mouse.down();
    for (const p of stroke.slice(1)) await page.mouse.move(...p, { steps: 6 });
    await page.mouse.up();
  }
}

/** Once the rework has ended, approves with a typed name and a drawn signature (an empty pad is refused first). */
async function approves(page: Page, name: string) {
  await expect(statusChip(page)).toHaveAttribute('data-status', 'ended', { timeout: 30_000 });
  await page.locator('input[name="approver-name"]').fill(name);
  await page.getByRole('button', { name: 'Approve', exact: true }).click();
  await expect(page.getByText('Signature: sign on the pad first')).toBeVisible();
  await signs(page);
  await page.getByRole('button', { name: 'Approve', exact: true }).click();
  await expect(statusChip(page)).toHaveAttribute('data-status', 'approved');
  const approval = page.getByTestId('approval');
  await expect(approval).toContainText(name);
  await expect(approval.getByTestId('signature-svg').locator('path')).toHaveCount(2);
}

/** The text of a PDF, read back with pdf-parse (a library apart from the one that wrote it). */
async function pdfText(bytes: Uint8Array): Promise<string> {
  const parser = new PDFParse({ data: bytes });
  try {
    return (await parser.getText()).text;
  } finally {
    await parser.destroy();
  }
}

/**
 * The as-left figures the record's own summary gives (tilt X and Y, twist, bow, sweep TIR), as the views write them in
 * `units` (lib/leveling/units display helpers): each must appear in the report's text.
 */
function asLeftFigures(state: SessionState, units: UnitSystem): string[] {
  const rows = summarizeSession(state).measures.filter((m) => ['tiltX', 'tiltY', 'twist', 'bow', 'sweepTir'].includes(m.measure));
  expect(rows.map((m) => m.measure).sort()).toEqual(['bow', 'sweepTir', 'tiltX', 'tiltY', 'twist']);
  return rows.map((m) => {
    expect(m.asLeft.value, `${m.measure} has an as-left value`).not.toBeNull();
    const v = Math.abs(m.asLeft.value!);
    return m.unit === 'urad' ? formatSlope(v, units) : formatLength(v, units);
  });
}

/** The reviewer downloads the approved report: a PDF whose text holds the machine, the as-left figures, the signer and the chain head. */
async function reportHoldsAsLeft(page: Page, sessionId: string, final: SessionState, units: UnitSystem) {
  const res = await page.request.get(`/api/sessions/${sessionId}/report`);
  expect(res.status()).toBe(200);
  expect(res.headers()['content-type']).toBe('application/pdf');
  const text = await pdfText(new Uint8Array(await res.body()));
  for (const figure of asLeftFigures(final, units)) expect(text).toContain(figure);
  expect(text).toContain('Rhea Quill');
  const verify = (await (await page.request.get(`/api/sessions/${sessionId}/verify`)).json()) as { verdict: { ok: boolean; head: string } };
  expect(verify.verdict.ok).toBe(true);
  expect(text.replace(/\s+/g, '')).toContain(verify.verdict.head);
  return text;
}

/**
 * The reviewer e-mails the report to the customer's contact; the mail (read from the loopback fake's mailbox) carries
 * the PDF, whose text holds the as-left figures, and a read-only link that opens the PDF without signing in.
 */
async function emailsReport(page: Page, sessionId: string, final: SessionState, units: UnitSystem) {
  const { recipient } = (await (await page.request.get(`/api/sessions/${sessionId}/report/send`)).json()) as { recipient: { name: string; email: string } };
  const since = Date.now();
  await page.getByRole('button', { name: `E-mail the report to ${recipient.name}` }).click();
  await expect(page.getByTestId('report-sent')).toContainText(recipient.email);
  const mail = await readMail(recipient.email, 15_000, since);
  const pdf = mail.attachments?.find((a) => a.contentType === 'application/pdf');
  expect(pdf, 'the report attached as a PDF').toBeTruthy();
  const attached = await pdfText(new Uint8Array(await readFile(path.join(process.env.MAILBOX_DIR!, pdf!.file))));
  for (const figure of asLeftFigures(final, units)) expect(attached).toContain(figure);
  const link = /https?:\/\/\S+\/api\/reports\/[A-Za-z0-9_.-]+/.exec(mail.text)?.[0];
  expect(link, 'a read-only link in the mail').toBeTruthy();
  // Signed out: a fresh request context with no cookies.
  const anonymous = await page.context().browser()!.newContext();
  try {
    const res = await anonymous.request.get(new URL(new URL(link!).pathname, page.url()).toString());
    expect(res.status()).toBe(200);
    expect(res.headers()['content-type']).toBe('application/pdf');
  } finally {
    await anonymous.close();
  }
}

test('a reviewer replays a finished session, returns it, and approves it after the technician’s rework', async ({ browser }) => {
  test.setTimeout(420_000);
  const tech = await signedIn(browser, 'technician', { width: 412, height: 915 });
  const expert = await signedIn(browser, 'expert', { width: 1280, height: 800 });
  const reviewer = await signedIn(browser, 'reviewer', { width: 1440, height: 900 });

  const ctx = await sessionWorkedToEnd(tech.page, expert.page);
  await tech.page.goto(`/sessions/${ctx.sessionId}/field`);
  await expect(tech.page.getByText('This session has ended')).toBeVisible({ timeout: 60_000 });
  await expect(tech.page.locator('[data-testid="link-state"][data-link="live"]')).toBeVisible({ timeout: 30_000 });

  await reviewerOpensReplay(reviewer.page, ctx);
  await plays(reviewer.page);
  await seeks(reviewer.page, ctx);
  const pinnedAt = await pinsComment(reviewer.page, 'Twist came in at the limit: was the level reversed here?');
  const reason = 'Retake the as-left along Y and finish again.';
  await returnsForRework(reviewer.page, reason);
  await fieldShowsReturn(tech.page, reason);

  await technicianTakesItUp(tech.page, ctx.sessionId);
  await retakesAsLeftAndFinishes(tech.page, ctx);

  await approves(reviewer.page, 'Rhea Quill');

  // The log holds the review as events: the comment at its moment, the return, the rework, the approval.
  const events = ((await (await reviewer.page.request.get(`/api/sessions/${ctx.sessionId}/events`)).json()) as { events: SessionEvent[] }).events;
  const final = foldEvents(events);
  expect(final.status).toBe('approved');
  expect(final.review.comments.map((c) => c.atSeq)).toEqual([pinnedAt]);
  expect(final.review.returns.map((r) => r.reasons)).toEqual([[reason]]);
  expect(final.review.resumes).toHaveLength(1);
  expect(final.review.approval?.name).toBe('Rhea Quill');
  expect(final.review.approval?.signature.strokes).toHaveLength(2);

  // The report: produced as a PDF holding the as-left figures, then e-mailed with a read-only link.
  const units = ((await (await reviewer.page.request.get('/api/me')).json()) as { me: { unitSystem: UnitSystem } }).me.unitSystem;
  await reportHoldsAsLeft(reviewer.page, ctx.sessionId, final, units);
  await emailsReport(reviewer.page, ctx.sessionId, final, units);

  for (const c of [tech.context, expert.context, reviewer.context]) await c.close();
});
