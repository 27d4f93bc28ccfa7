import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { canSee, NAV_ITEMS } from '../../src/components/shell/navigation';
import { ROLES, type Role } from '../../src/contracts/roles';
import { acknowledgeCautionsIfShown, appRendered, launch, PHONE, screenshot, signIn, watchedPage, WIDE, type Watched } from './browser';
import { HOME } from '../../src/components/shell/navigation';
import { unlabelledFigures } from './screen-text-rules';

// The guard against the phone-layout class of fault: every screen of every role, at a phone's and a desktop's
// size, with nothing covered, nothing cut off sideways and nothing on the console.
const baseURL = inject('baseURL');
const PROBE = fs.readFileSync(path.join(__dirname, 'layout-probe.js'), 'utf8');
let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(() => browser?.close());

type Place = { path: string; screen: string };

async function json<T>(page: Page, url: string): Promise<T> {
  const res = await page.request.get(`${baseURL}${url}`);
  expect(res.status(), url).toBe(200);
  return (await res.json()) as T;
}

/** Every place a role can open: its navigation, and the first record of each detail screen it reaches. */
async function placesOf(page: Page, role: Role): Promise<Place[]> {
  const sees = (name: string) => canSee(role, name);
  const screenOf: Record<string, string> = {
    site: 'site',
    planner: 'planner',
    'sign-offs': 'sign-offs',
    lots: 'lots',
    batches: 'batches',
    billing: 'billing',
    audit: 'audit',
    you: 'you',
  };
  const places: Place[] = NAV_ITEMS.filter((i) => sees(i.name)).map((i) => ({ path: i.href, screen: `screen-${screenOf[i.name]}` }));
  places.push({ path: '/cautions', screen: 'screen-cautions' });
  if (sees('sign-offs')) {
    const { changeRequests } = await json<{ changeRequests: { id: number; status: string }[] }>(page, '/api/change-requests');
    const waiting = changeRequests.find((c) => c.status === 'proposed') ?? changeRequests[0];
    if (waiting) places.push({ path: `/sign-offs/${waiting.id}`, screen: 'screen-change-request' });
  }
  if (sees('lots')) {
    const { lots } = await json<{ lots: { id: number }[] }>(page, '/api/lots');
    const { enzymes } = await json<{ enzymes: { id: number }[] }>(page, '/api/enzymes');
    places.push(
      { path: `/lots/${lots[0].id}`, screen: 'screen-lot' },
      { path: '/lots/enzymes', screen: 'screen-enzymes' },
      { path: `/lots/enzymes/${enzymes[0].id}`, screen: 'screen-enzyme' },
    );
  }
  if (sees('planner')) {
    const { recipes } = await json<{ recipes: { id: number }[] }>(page, '/api/recipes');
    if (role === 'engineer') places.push({ path: `/planner/${recipes[0].id}`, screen: 'screen-recipe-planner' });
    const { plans } = await json<{ plans: { id: number }[] }>(page, '/api/plans');
    if (plans[0]) places.push({ path: `/planner/plan/${plans[0].id}`, screen: 'screen-plan' });
  }
  if (sees('batches')) {
    const { batches } = await json<{ batches: { id: number; status: string }[] }>(page, '/api/batches');
    const running = batches.find((b) => b.status === 'running') ?? batches[0];
    const closed = batches.find((b) => b.status === 'closed');
    places.push({ path: `/batches/${running.id}`, screen: 'screen-batch' });
    if (closed) places.push({ path: `/batches/report/${closed.id}`, screen: 'screen-batch-report' });
    places.push({ path: '/batches/start', screen: 'screen-batch-start' });
  }
  return places;
}

/** Opens a place and waits for its data: no loader left and the network quiet. */
async function open(page: Page, place: Place): Promise<void> {
  await page.goto(`${baseURL}${place.path}`);
  await appRendered(page);
  await page.getByTestId(place.screen).waitFor();
  await page.waitForLoadState('networkidle');
  await page.waitForFunction(() => !document.querySelector('[data-testid="loader"]'), undefined, { timeout: 15_000 });
  await page.evaluate(() => document.fonts.ready);
}

describe('every screen of every role lays out cleanly', () => {
  it.each(ROLES)('%s: nothing covered, nothing cut off, no console error, every figure labelled (phone and desktop)', async (role) => {
    const watched: Watched = await watchedPage(browser, PHONE);
    const { page, context, errors } = watched;
    // The navigation's places make no call the API refuses this role (src/contracts/permissions.ts).
    const refused: string[] = [];
    page.on('response', (r) => {
      if (r.status() === 403 && new URL(r.url()).pathname.startsWith('/api/')) refused.push(`${r.request().method()} ${new URL(r.url()).pathname} refused`);
    });
    // One sign-in per role; both sizes reuse it.
    await signIn(page, baseURL, role);
    await acknowledgeCautionsIfShown(page, `screen-${HOME[role].slice(1)}`);
    const places = await placesOf(page, role);
    const found: string[] = [];
    for (const viewport of [PHONE, WIDE]) {
      await page.setViewportSize(viewport);
      for (const place of places) {
        await open(page, place);
        const where = `${place.path} at ${viewport.width}x${viewport.height}`;
        const problems = (await page.evaluate(`(${PROBE})(${JSON.stringify(place.screen)})`)) as string[];
        found.push(...problems.map((p) => `${where}: ${p}`));
        const text = await page.getByTestId(place.screen).innerText();
        found.push(...unlabelledFigures(text).map((p) => `${where}: ${p}`));
        found.push(...errors.splice(0).map((e) => `${where}: console: ${e}`));
        found.push(...refused.splice(0).map((e) => `${where}: ${e}`));
        await screenshot(page, `guard-${role}${place.path.replace(/\//g, '-')}-${viewport.width}x${viewport.height}`);
      }
    }
    expect(found).toEqual([]);
    await context.close();
  });
});
