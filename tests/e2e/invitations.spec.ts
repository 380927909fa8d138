import { expect, test } from '@playwright/test';
import { AdminUsersPage, readMail } from './pages/admin-page';
import { signedIn } from './pages/personas';

test('an admin invites a technician by e-mail; the invitee sets a password through the link and signs in', async ({ browser }) => {
  test.setTimeout(180_000); // several pages and round trips; the first visits compile in development mode
  const admin = await signedIn(browser, 'admin', { width: 1024, height: 768 });
  const users = new AdminUsersPage(admin.page);
  const email = `new-tech-${Date.now().toString(36)}@northmere.test`;
  await users.open();
  await users.invite(email, 'technician');
  await expect(users.pending()).toContainText(email);

  const mail = await readMail(email);
  expect(mail.subject).toBe('You are invited to Levelwire');
  const link = /https?:\/\/\S+\/invite\/[A-Za-z0-9_-]{43}/.exec(mail.text)?.[0];
  expect(link).toBeDefined();

  const invitee = await browser.newContext({ viewport: { width: 1024, height: 768 } });
  const page = await invitee.newPage();
  await page.goto(new URL(link!).pathname);
  await expect(page.getByText('as a technician')).toBeVisible();
  await page.getByLabel('Your name').fill('Quinn Ashby');
  await page.getByLabel('New password').fill('short');
  await page.getByRole('button', { name: 'Join and go to sign-in' }).click();
  await expect(page.getByRole('alert').filter({ hasText: 'must be at least 12 characters' })).toBeVisible();
  await page.getByLabel('New password').fill('plumb-and-level-2026');
  await page.getByRole('button', { name: 'Join and go to sign-in' }).click();
  await page.waitForURL(/\/sign-in/);

  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('plumb-and-level-2026');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
  await expect(page.getByRole('banner').getByText('Quinn Ashby')).toBeVisible();
  await expect(page.getByRole('banner').getByText('technician', { exact: true })).toBeVisible();

  // The link works once.
  await page.goto(new URL(link!).pathname);
  await expect(page.getByRole('alert').filter({ hasText: 'already been used' })).toBeVisible();

  // The admin sees the new person and no longer the pending invitation.
  await users.open();
  await expect(users.userRow(email)).toContainText('Quinn Ashby');
  await expect(users.pending()).not.toContainText(email);

  // Deactivating them ends their access on the next request.
  await users.userRow(email).getByRole('button', { name: 'Deactivate' }).click();
  await expect(users.userRow(email)).toContainText('Deactivated');
  await page.goto('/instruments');
  await expect(page).toHaveURL(/\/sign-in/);

  await invitee.close();
  await admin.context.close();
});
