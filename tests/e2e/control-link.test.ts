import os from 'node:os';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { startPlant, type Plant } from '../../server/opcua/plant';
import { accessibilityViolations, acknowledgeCautionsIfShown, appRendered, launch, PHONE, screenshot, signIn, watchedPage, WIDE } from './browser';

// The control-system link seen by people: the admin sets a vessel's source and trusts the server's certificate
// on the site page, which then shows the link connected; the operator's batch page shows the readings arriving.
// The plant is this test's own (server/opcua/plant.ts on a free port), ticking once a second near the plan.

const baseURL = inject('baseURL');
const HEADERS = { 'x-yieldpoint-client': 'e2e' };
const TAG = 'R-101 Saccharifier';
const USER = { userName: 'reader', password: 'e2e-plant-password' };
let browser: Browser;
let plant: Plant;
beforeAll(async () => {
  [browser, plant] = await Promise.all([
    launch(),
    startPlant({
      pkiFolder: path.join(os.tmpdir(), 'yieldpoint-test-plant-pki'),
      users: [USER],
      tags: [TAG],
      setpointOf: () => 59,
      tickMs: 1000,
      excursionChance: 0,
    }),
  ]);
});
afterAll(async () => {
  await browser?.close();
  await plant?.close();
});

describe('the control-system link', () => {
  it('the admin connects a vessel and trusts the server; the operator sees control-system readings arrive', async () => {
    const admin = await watchedPage(browser, WIDE);
    await signIn(admin.page, baseURL, 'admin');
    await acknowledgeCautionsIfShown(admin.page, 'screen-site');
    const vessels = (await (await admin.page.request.get(`${baseURL}/api/vessels`)).json()).vessels as { id: number; name: string }[];
    const vessel = vessels.find((v) => v.name === TAG)!;
    const saved = await admin.page.request.put(`${baseURL}/api/control-link/sources/${vessel.id}`, {
      headers: HEADERS,
      data: { endpointUrl: plant.endpointUrl, nodeId: plant.nodeIdOf(TAG), ...USER },
    });
    expect(saved.status()).toBe(200);
    // The trust step on the screen: show the certificate, compare, trust.
    await admin.page.reload();
    await appRendered(admin.page);
    await admin.page.getByTestId('server-certificate').click();
    await expect.poll(async () => (await admin.page.getByTestId('server-thumbprint').textContent()) ?? '').toMatch(/SHA-1 ([0-9A-F]{2}:){19}[0-9A-F]{2}/);
    await admin.page.getByTestId('server-trust').click();
    await expect.poll(async () => (await admin.page.getByTestId('link-status').textContent()) ?? '', { timeout: 30_000 }).toMatch(/connected/);
    await expect.poll(async () => (await admin.page.getByTestId('link-status').textContent()) ?? '', { timeout: 30_000 }).toMatch(/59\.\d/);
    await screenshot(admin.page, 'link-admin-1440');
    expect(await accessibilityViolations(admin.page)).toEqual([]);
    await admin.page.setViewportSize(PHONE);
    await screenshot(admin.page, 'link-admin-390');
    expect(admin.errors).toEqual([]);

    const op = await watchedPage(browser, PHONE);
    await signIn(op.page, baseURL, 'operator');
    await acknowledgeCautionsIfShown(op.page, 'screen-batches');
    const batches = (await (await op.page.request.get(`${baseURL}/api/batches`)).json()).batches as { id: number; state: string; vesselName: string }[];
    const batch = batches.find((b) => b.state === 'running' && b.vesselName === TAG)!;
    await op.page.goto(`${baseURL}/batches/${batch.id}`);
    await appRendered(op.page);
    await expect.poll(async () => (await op.page.getByTestId('batch-link').textContent()) ?? '', { timeout: 30_000 }).toMatch(/connected · last 59\.\d °C/);
    // Live: the table shows more control-system rows as they arrive, without a reload.
    const table = async () => (await op.page.getByTestId('readings-table').textContent()) ?? '';
    await expect.poll(table, { timeout: 30_000 }).toContain('control system');
    const before = await table();
    await expect.poll(table, { timeout: 30_000 }).not.toBe(before);
    await screenshot(op.page, 'link-batch-390');
    await op.page.setViewportSize(WIDE);
    await screenshot(op.page, 'link-batch-1440');
    expect(op.errors).toEqual([]);
  });
});
