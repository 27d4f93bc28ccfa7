import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import type { Role } from '../../src/contracts/roles';
import { DEMO_USERS } from '../../db/seed';

export const PHONE = { width: 390, height: 844 };
export const WIDE = { width: 1440, height: 900 };
export const SHOTS = path.resolve(__dirname, '../../test-results/screenshots');

/** Debian's Chromium, headless, with the flags this closed network needs. */
export function launch(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

export type Watched = { page: Page; context: BrowserContext; errors: string[] };

/** A page that records every console error and uncaught exception, so tests can fail on them. */
export async function watchedPage(browser: Browser, viewport: { width: number; height: number }): Promise<Watched> {
  const context = await browser.newContext({ viewport });
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  page.on('pageerror', (e) => errors.push(String(e)));
  return { page, context, errors };
}

export async function screenshot(page: Page, name: string): Promise<void> {
  fs.mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: false });
}

/** Waits until the app has replaced the page's build-time snapshot (which is inert). */
export async function appRendered(page: Page): Promise<void> {
  await page.waitForFunction(() => !document.body.inert);
}

export async function signIn(page: Page, baseURL: string, role: Role): Promise<void> {
  const user = DEMO_USERS.find((u) => u.role === role)!;
  await page.goto(`${baseURL}/`);
  await appRendered(page);
  await page.getByTestId('sign-in-email').fill(user.email);
  await page.getByTestId('sign-in-password').fill(user.password);
  await page.getByTestId('sign-in-submit').click();
}

/** Confirms the first-run cautions notice when it shows. */
export async function acknowledgeCautions(page: Page): Promise<void> {
  const button = page.getByTestId('acknowledge-cautions');
  await button.waitFor({ timeout: 10_000 });
  await button.click();
  await button.waitFor({ state: 'detached' });
}

/**
 * axe-core's WCAG 2.0–2.2 A/AA rules on the page as it stands; returns one line per violation so a failing
 * test names the rule and the elements.
 */
export async function accessibilityViolations(page: Page): Promise<string[]> {
  const { AxeBuilder } = await import('@axe-core/playwright');
  // Label in name (WCAG 2.5.3) is marked experimental in axe, so off unless asked for.
  // `options` first: it replaces the whole options object, tags included.
  const result = await new AxeBuilder({ page })
    .options({ rules: { 'label-content-name-mismatch': { enabled: true } } })
    .withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa'])
    .analyze();
  return result.violations.map(
    (v) =>
      `${v.id}: ${v.help} (${v.nodes
        .map((n) => n.target.join(' '))
        .slice(0, 3)
        .join('; ')})`,
  );
}

/** Confirms the cautions notice only if it shows: journeys share one server, and each user confirms it once. */
export async function acknowledgeCautionsIfShown(page: Page, screenTestId: string): Promise<void> {
  await page.getByTestId(screenTestId).waitFor();
  if (await page.getByTestId('acknowledge-cautions').isVisible()) await acknowledgeCautions(page);
}
