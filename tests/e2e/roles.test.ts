import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { BUNDLE_LOADER_CSP } from '../../server/web-build/rewrite';
import { BUNDLE_PARTS_ID } from '../../src/web/page';
import { HOME, navItemsFor } from '../../src/components/shell/navigation';
import { ROLES } from '../../src/contracts/roles';
import { accessibilityViolations, acknowledgeCautionsIfShown, appRendered, launch, PHONE, screenshot, signIn, watchedPage, WIDE } from './browser';

const baseURL = inject('baseURL');
let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(() => browser?.close());

const screenOf = (href: string) => `screen-${href.slice(1)}`;

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
] as const)('each role on a %s screen', (_label, viewport) => {
  it.each(ROLES)('%s signs in, lands on its home, sees only its places, and signs out', async (role) => {
    const { page, context, errors } = await watchedPage(browser, viewport);
    await signIn(page, baseURL, role);
    // Other journeys on the same server may have confirmed this user's notice already.
    await acknowledgeCautionsIfShown(page, screenOf(HOME[role]));
    await page.getByTestId(screenOf(HOME[role])).waitFor();
    expect(new URL(page.url()).pathname).toBe(HOME[role]);

    const expected = navItemsFor(role)
      .map((i) => `nav-${i.name}`)
      .sort();
    const shown = await page
      .locator('[data-testid^="nav-"]')
      .evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')!).filter((id) => id !== 'nav' && id !== 'nav-cautions'));
    expect(shown.sort()).toEqual(expected);
    await screenshot(page, `${role}-home-${viewport.width}x${viewport.height}`);
    expect(await accessibilityViolations(page)).toEqual([]);

    await page.getByTestId('nav-you').click();
    await page.getByTestId('sign-out').click();
    await page.getByTestId('screen-sign-in').waitFor();
    // Signed out means signed out: the home screen sends us back to sign in.
    await page.goto(`${baseURL}${HOME[role]}`);
    await page.getByTestId('screen-sign-in').waitFor();
    expect(errors).toEqual([]);
    await context.close();
  });
});

describe('shell', () => {
  it('serves the real app with its security headers and breaks none of its own content security policy', async () => {
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await page.addInitScript(() => {
      (window as unknown as { cspViolations: string[] }).cspViolations = [];
      document.addEventListener('securitypolicyviolation', (e) =>
        (window as unknown as { cspViolations: string[] }).cspViolations.push(`${e.violatedDirective} ${e.blockedURI}`),
      );
    });
    const response = await page.goto(`${baseURL}/`);
    const headers = response!.headers();
    expect(headers['content-security-policy']).toMatch(/default-src 'self'/);
    // Scripts from the site itself, and one inline script: the page's bundle loader, by its hash.
    expect(headers['content-security-policy']).toContain(`script-src 'self' ${BUNDLE_LOADER_CSP};`);
    expect(headers['content-security-policy']).toMatch(/frame-ancestors 'none'/);
    expect(headers['x-content-type-options']).toBe('nosniff');
    expect(headers['referrer-policy']).toBe('no-referrer');
    expect(headers['cache-control']).toBe('no-store');
    // A signed-in journey: the shell, a chart (SVG) and the fonts all load under the policy.
    await signIn(page, baseURL, 'operator');
    await acknowledgeCautionsIfShown(page, screenOf(HOME.operator));
    await page.getByTestId('forecast-accuracy').waitFor();
    await page.evaluate(() => document.fonts.ready);
    expect(await page.evaluate(() => (window as unknown as { cspViolations: string[] }).cspViolations)).toEqual([]);
    expect(errors).toEqual([]);
    await context.close();
  });

  it('opens a signed-in page from the session the page carries, without asking the API who is signed in', async () => {
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await signIn(page, baseURL, 'procurement');
    await acknowledgeCautionsIfShown(page, screenOf(HOME.procurement));
    const asked: string[] = [];
    page.on('request', (r) => {
      if (new URL(r.url()).pathname.startsWith('/api/')) asked.push(`${r.method()} ${new URL(r.url()).pathname}`);
    });
    await page.reload();
    await page.getByTestId(screenOf(HOME.procurement)).waitFor();
    await page.getByTestId('nav-you').waitFor();
    expect(asked).not.toContain('GET /api/session');
    expect(asked).toContain('GET /api/lots');
    expect(errors).toEqual([]);
    await context.close();
  });

  it('shows a wrong password under the form without console errors', async () => {
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await page.goto(`${baseURL}/`);
    await page.getByTestId('sign-in-email').fill('engineer@haldenbay.test');
    await page.getByTestId('sign-in-password').fill('wrong-password');
    await page.getByTestId('sign-in-submit').click();
    await expect(page.getByTestId('sign-in-error').textContent()).resolves.toMatch(/not right/);
    await screenshot(page, 'sign-in-error-390x844');
    expect(await accessibilityViolations(page)).toEqual([]);
    // The 401 of the failed attempt is the one expected error.
    expect(errors.filter((e) => !e.includes('401'))).toEqual([]);
    await context.close();
  });

  it('reaches the cautions from every screen and shows a not-found screen', async () => {
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await signIn(page, baseURL, 'operator');
    await page.getByTestId('screen-batches').waitFor();
    await page.getByTestId('topbar-cautions').click();
    await page.getByTestId('screen-cautions').waitFor();
    expect(await page.getByTestId('cautions-list').textContent()).toMatch(/pressure/i);
    const missing = await page.goto(`${baseURL}/no/such/place`);
    // A path no route names is answered 404 (the browser logs that status), with the app's not-found screen.
    expect(missing?.status()).toBe(404);
    await page.getByTestId('screen-not-found').waitFor();
    await screenshot(page, 'not-found-390x844');
    expect(await accessibilityViolations(page)).toEqual([]);
    expect(errors.filter((e) => !e.includes('404'))).toEqual([]);
    await context.close();
  });

  it('keeps an operator out of the site screen even by its address', async () => {
    const { page, context, errors } = await watchedPage(browser, WIDE);
    await signIn(page, baseURL, 'operator');
    await page.getByTestId('screen-batches').waitFor();
    await page.goto(`${baseURL}/site`);
    await page.getByTestId('screen-not-for-role').waitFor();
    expect(errors).toEqual([]);
    await context.close();
  });

  it('lets a supervisor read the audit trail and check its chain', async () => {
    const { page, context, errors } = await watchedPage(browser, WIDE);
    await signIn(page, baseURL, 'supervisor');
    await page.getByTestId('screen-sign-offs').waitFor();
    await page.getByTestId('open-audit').click();
    await page.getByTestId('audit-table').waitFor();
    expect(await page.getByTestId('audit-table').textContent()).toContain('supervisor@haldenbay.test');
    await page.getByTestId('audit-verify').click();
    await expect(page.getByTestId('audit-verify-result').textContent()).resolves.toMatch(/^Unbroken: all \d+ events check out\.$/);
    await screenshot(page, 'supervisor-audit-1440x900');
    expect(await accessibilityViolations(page)).toEqual([]);
    expect(errors).toEqual([]);
    await context.close();
  });
});

describe('the page before its JavaScript has run', () => {
  it.each(ROLES)("draws the %s home's frame and headings from the HTML alone, inert, and only on a phone", async (role) => {
    const phone = await browser.newContext({ viewport: PHONE, javaScriptEnabled: false });
    const page = await phone.newPage();
    await page.goto(`${baseURL}${HOME[role]}`);
    const screen = page.getByTestId(screenOf(HOME[role]));
    expect(await screen.isVisible()).toBe(true);
    expect(await page.getByTestId('topbar').isVisible()).toBe(true);
    expect(await page.evaluate(() => document.body.inert)).toBe(true);
    await screenshot(page, `${role}-home-before-script-390x844`);
    await phone.close();

    // On a wide screen the phone-shaped snapshot stays hidden: the app draws the sidebar layout itself.
    const wide = await browser.newContext({ viewport: WIDE, javaScriptEnabled: false });
    const widePage = await wide.newPage();
    await widePage.goto(`${baseURL}${HOME[role]}`);
    expect(await widePage.getByTestId(screenOf(HOME[role])).isVisible()).toBe(false);
    await wide.close();
  });

  it('hands over to the app: the page becomes interactive and the snapshot is gone', async () => {
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await page.goto(`${baseURL}/sign-in`);
    await page.getByTestId('sign-in-submit').waitFor();
    await expect.poll(() => page.evaluate(() => document.body.inert || document.body.hasAttribute('data-snapshot'))).toBe(false);
    await signIn(page, baseURL, 'operator');
    await page.getByTestId('screen-batches').waitFor();
    expect(await page.getByTestId('screen-batches').count()).toBe(1);
    expect(errors).toEqual([]);
    await context.close();
  });

  /** When the page's first contentful paint happened, when it had been parsed, and when each part began to download. */
  const partTimes = (page: Page) =>
    page.evaluate((id) => {
      const list = JSON.parse(document.getElementById(id)!.textContent!) as string[];
      const entries = performance.getEntriesByType('resource') as PerformanceResourceTiming[];
      return {
        // Null until the browser has presented the first contentful frame (a wide screen paints only the app).
        fcp: performance.getEntriesByName('first-contentful-paint')[0]?.startTime ?? null,
        parsed: (performance.getEntriesByType('navigation')[0] as PerformanceNavigationTiming).domContentLoadedEventStart,
        fetched: list.map((url) => entries.find((e) => new URL(e.name).pathname === url)?.startTime ?? -1),
      };
    }, BUNDLE_PARTS_ID);

  it("fetches the app's script, in parts, once the snapshot has painted", async () => {
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await page.goto(`${baseURL}/sign-in`);
    await appRendered(page);
    const { fcp, fetched } = await partTimes(page);
    expect(fcp).not.toBeNull();
    expect(fetched.length).toBeGreaterThan(1);
    for (const start of fetched) expect(start).toBeGreaterThanOrEqual(fcp!);
    expect(errors).toEqual([]);
    await context.close();
  });

  it.each([
    ['in a background tab, which paints nothing', PHONE, () => Object.defineProperty(Document.prototype, 'hidden', { get: () => true })],
    ['in a browser that reports no paints', PHONE, () => delete (window as { PerformanceObserver?: unknown }).PerformanceObserver],
    ['on a wide screen, where the snapshot stays hidden', WIDE, null],
  ])('fetches it at once %s', async (_, viewport, change) => {
    const { page, context, errors } = await watchedPage(browser, viewport);
    if (change) await page.addInitScript(change);
    await page.goto(`${baseURL}/sign-in`);
    await appRendered(page);
    await page.getByTestId('sign-in-submit').waitFor();
    // At once: while the page is still being parsed, not after a paint or the one-second fallback.
    const { parsed, fetched } = await partTimes(page);
    expect(fetched[0]).toBeGreaterThanOrEqual(0);
    expect(fetched[0]).toBeLessThan(parsed);
    expect(errors).toEqual([]);
    await context.close();
  });
});
