import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { USER_CACHES } from '../../src/web/offline';
import { acknowledgeCautionsIfShown, launch, PHONE, screenshot, signIn, watchedPage } from './browser';

const baseURL = inject('baseURL');
let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(() => browser?.close());

// Functions handed to the page are strings: tsx would compile them with a helper the page lacks (DEVELOPERS.md).
const CONTROLLED = 'navigator.serviceWorker.ready.then(() => !!navigator.serviceWorker.controller)';
const CACHE_NAMES = 'caches.keys()';

describe('the operator at the vessel without a network', () => {
  it('logs three readings offline, reloads the batch page from the cache, sends them once back online, and sign-out empties the caches', async () => {
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await signIn(page, baseURL, 'operator');
    await acknowledgeCautionsIfShown(page, 'screen-batches');
    await page.locator('[data-testid="my-batches"] [data-testid^="batch-card-"]').first().click();
    await page.getByTestId('reading-entry').waitFor();
    const apiPath = new URL(page.url()).pathname.replace('/batches', '/api/batches');
    const stored = async () => (await (await page.request.get(`${baseURL}${apiPath}`)).json()).readings.length as number;
    const n0 = await stored();
    // The service worker installs after the first load; a reload online puts this page in its cache.
    await expect.poll(() => page.evaluate(CONTROLLED), { timeout: 30_000 }).toBe(true);
    await page.reload();
    await page.getByTestId('reading-entry').waitFor();

    await context.setOffline(true);
    for (const [i, c] of ['37.1', '37.2', '37.3'].entries()) {
      await page.getByTestId('reading-c').fill(c);
      await page.getByTestId('reading-submit').click();
      // The first may be far from the batch's last reading: then it asks once.
      if (i === 0) {
        await page.locator('[data-testid="reading-queue"], [data-testid="reading-confirm"]').first().waitFor();
        if (await page.getByTestId('reading-confirm').isVisible()) await page.getByTestId('reading-confirm-yes').click();
      }
      await expect
        .poll(() => page.getByTestId('reading-queue').textContent(), { timeout: 10_000 })
        .toMatch(new RegExp(`^${i + 1} readings? saved on this device`));
    }
    await page.reload();
    await page.getByTestId('screen-batch').waitFor();
    const table = page.getByTestId('readings-table');
    await expect.poll(() => table.getByText('on this device').count(), { timeout: 20_000 }).toBe(3);
    expect(await page.getByTestId('cached-note').textContent()).toMatch(/^As of \d{2}:\d{2} [A-Z]{2,5}, offline/);
    expect(await page.getByTestId('batch-sentence').textContent()).toMatch(new RegExp(`^${n0 + 3} readings\\.`));
    expect(await page.getByTestId('status-figures').textContent()).toMatch(/preview/);
    await screenshot(page, 'batch-offline-reloaded-390x844');

    await context.setOffline(false);
    await expect
      .poll(
        () =>
          page
            .getByTestId('reading-sent')
            .textContent()
            .catch(() => null),
        { timeout: 30_000 },
      )
      .toBe('3 readings sent');
    await expect.poll(() => table.getByText('on this device').count(), { timeout: 10_000 }).toBe(0);
    await expect.poll(() => page.getByTestId('cached-note').count(), { timeout: 10_000 }).toBe(0);
    // Sent once each: the three keys held across the reload and the resend.
    expect(await stored()).toBe(n0 + 3);
    await screenshot(page, 'batch-sent-390x844');

    const before = (await page.evaluate(CACHE_NAMES)) as string[];
    expect(before).toEqual(expect.arrayContaining([...USER_CACHES]));
    await page.goto(`${baseURL}/you`);
    await page.getByTestId('sign-out').click();
    await page.getByTestId('sign-in-email').waitFor();
    const after = (await page.evaluate(CACHE_NAMES)) as string[];
    expect(after.filter((n) => (USER_CACHES as readonly string[]).includes(n))).toEqual([]);
    // The failed fetches while offline are the expected console errors.
    expect(errors.filter((e) => !/Failed to fetch|ERR_INTERNET_DISCONNECTED|net::|status of 503/.test(e))).toEqual([]);
    await context.close();
  });
});
