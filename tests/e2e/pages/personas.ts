import type { Browser, BrowserContext, Page } from '@playwright/test';
import { DEMO_PASSWORD, DEMO_USERS } from '../../../db/seed';

export type Persona = (typeof DEMO_USERS)[number]['role'];

export const emailOf = (role: Persona) => DEMO_USERS.find((u) => u.role === role)!.email;

/**
 * A fresh browser context signed in through the sign-in page as one of the demo personas: `screen` is the window's
 * size and, when given, the browser's time zone (an IANA name); `beforeFirstPage` runs on the new page before it
 * opens anything (to watch it from the start).
 */
export async function signedIn(
  browser: Browser,
  role: Persona,
  screen?: { width: number; height: number; timezoneId?: string },
  beforeFirstPage?: (page: Page) => Promise<void>,
): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext(screen ? { viewport: { width: screen.width, height: screen.height }, timezoneId: screen.timezoneId } : {});
  const page = await context.newPage();
  await beforeFirstPage?.(page);
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(emailOf(role));
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
  return { context, page };
}
