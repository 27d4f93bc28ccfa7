import fs from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import { readSinkDir } from '../../server/fakes/smtp-sink';
import { acknowledgeCautions, launch, PHONE, screenshot, signIn, watchedPage, WIDE } from './browser';
import { startServer, type RunningServer } from '../support/server';

// Its own server: this journey buys seats and adds a user, which the shared server's other journeys must not see.
let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  [server, browser] = await Promise.all([startServer(), launch()]);
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
  if (server) fs.rmSync(server.dir, { recursive: true, force: true });
});

const NEW_USER = { email: 'new.engineer@haldenbay.test', name: 'Noor Engineer', password: 'a-long-e2e-password' };

async function waitForMail(to: string): Promise<{ subject: string; text: string }> {
  const dir = path.join(server.dir, 'mail-sink');
  for (let i = 0; i < 100; i++) {
    const found = readSinkDir(dir).find((m) => m.to.includes(to));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`no mail to ${to} in ${dir}`);
}

const text = (page: Page, testID: string) => page.getByTestId(testID).textContent();

describe('billing and invites', () => {
  it('admin buys 3 more seats, invites a user, and the user sets a password from the mail and signs in', async () => {
    const admin = await watchedPage(browser, WIDE);
    const { page } = admin;
    await signIn(page, server.baseURL, 'admin');
    await acknowledgeCautions(page);
    await page.getByTestId('nav-billing').click();
    await page.getByTestId('screen-billing').waitFor();
    expect(await text(page, 'billing-seats')).toBe('8');
    expect(await text(page, 'billing-seats-in-use')).toBe('5');
    await page.getByTestId('billing-invoices').waitFor();
    await screenshot(page, 'billing-1440x900');

    await page.getByTestId('billing-buy-count').fill('3');
    await page.getByTestId('billing-buy-submit').click();
    await page.waitForURL(/\/pay\/cs_test_/);
    // A declined card first: the page says so and nothing changes.
    await page.getByTestId('pay-card').fill('4000 0000 0000 0002');
    await page.getByTestId('pay-submit').click();
    expect(await text(page, 'pay-error')).toBe('Your card was declined.');
    await page.getByTestId('pay-card').fill('4242 4242 4242 4242');
    await page.getByTestId('pay-submit').click();
    await page.waitForURL(/\/billing\?checkout=done/);
    await page.getByTestId('billing-return-done').waitFor();
    await expect.poll(() => text(page, 'billing-seats')).toBe('11');
    await expect.poll(() => page.getByTestId('billing-invoices-row').count()).toBe(4);
    await screenshot(page, 'billing-after-purchase-1440x900');

    await page.getByTestId('nav-site').click();
    await page.getByTestId('invite-email').fill(NEW_USER.email);
    await page.getByTestId('invite-role-engineer').click();
    await page.getByTestId('invite-submit').click();
    await page.getByTestId('invite-sent').waitFor();
    await page.getByTestId('pending-invite').waitFor();
    const mail = await waitForMail(NEW_USER.email);
    expect(mail.subject).toBe('Ines Varga invited you to Yieldpoint at Halden Bay Biorefinery');
    const link = /(http:\/\/\S+\/accept-invite\?token=[\w-]+)/.exec(mail.text)![1]!;
    // The mail reached the sink, so the outbox lists it as sent.
    await page.reload();
    // The invite sits beside the demo's sign-off notice to the supervisor.
    const inviteRow = page.getByTestId('mail-outbox-row').filter({ hasText: `To ${NEW_USER.email}` });
    await inviteRow.getByTestId('mail-status-sent').waitFor();
    expect(await inviteRow.count()).toBe(1);
    expect(await page.getByTestId('mail-outbox-row').filter({ hasText: 'Sign-off needed: Lactose-free milk base' }).count()).toBe(1);
    await screenshot(page, 'site-people-outbox-1440x900');
    expect(admin.errors).toEqual([]);
    await admin.context.close();

    const invited = await watchedPage(browser, PHONE);
    await invited.page.goto(link);
    expect(await text(invited.page, 'accept-invite-who')).toBe(`${NEW_USER.email} · Process engineer`);
    await invited.page.getByTestId('accept-name').fill(NEW_USER.name);
    await invited.page.getByTestId('accept-password').fill(NEW_USER.password);
    await invited.page.getByTestId('accept-password-repeat').fill(NEW_USER.password);
    await screenshot(invited.page, 'accept-invite-390x844');
    await invited.page.getByTestId('accept-submit').click();
    await invited.page.getByTestId('sign-in-welcome').waitFor();
    expect(await invited.page.getByTestId('sign-in-email').inputValue()).toBe(NEW_USER.email);
    await invited.page.getByTestId('sign-in-password').fill(NEW_USER.password);
    await invited.page.getByTestId('sign-in-submit').click();
    await acknowledgeCautions(invited.page);
    await invited.page.getByTestId('screen-planner').waitFor();
    await invited.page.getByTestId('nav-you').click();
    expect(await text(invited.page, 'you-name')).toBe(NEW_USER.name);
    expect(invited.errors).toEqual([]);
    await invited.context.close();
  });

  it('shows billing and the people on a phone', async () => {
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await signIn(page, server.baseURL, 'admin');
    await page.getByTestId('screen-site').waitFor();
    await page.getByTestId('nav-billing').click();
    await page.getByTestId('screen-billing').waitFor();
    expect(await text(page, 'billing-seats')).toBe('11');
    expect(await text(page, 'billing-seats-in-use')).toBe('6');
    await screenshot(page, 'billing-390x844');
    await page.getByTestId('nav-site').click();
    await page.getByTestId('invite-card').waitFor();
    await screenshot(page, 'site-people-390x844');
    expect(errors).toEqual([]);
    await context.close();
  });
});
