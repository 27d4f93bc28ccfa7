import fs from 'node:fs';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '../../db/seed';
import { readSinkDir } from '../../server/fakes/smtp-sink';
import { inputsFromRecipe } from '../../src/planning/inputs';
import { sessionCookie, startServer, type RunningServer } from '../support/server';
import { acknowledgeCautions, launch, PHONE, screenshot, signIn, watchedPage, WIDE } from './browser';

// Its own server: an approval changes a demo recipe's setpoint, which the shared server's journeys must not see.
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

const user = (role: string) => DEMO_USERS.find((u) => u.role === role)!;

async function waitForMail(to: string, subject: RegExp): Promise<{ subject: string; text: string }> {
  const dir = path.join(server.dir, 'mail-sink');
  for (let i = 0; i < 150; i++) {
    const found = readSinkDir(dir).find((m) => m.to.includes(to) && subject.test(m.subject));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`no mail to ${to} matching ${subject} in ${dir}`);
}

async function apiAs(role: string, method: string, p: string, body?: unknown) {
  const cookie = await sessionCookie(server.baseURL, user(role).email, user(role).password);
  const res = await fetch(`${server.baseURL}/api${p}`, {
    method,
    headers: { cookie, 'x-yieldpoint-client': 'script', ...(body ? { 'content-type': 'application/json' } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });
  return { status: res.status, body: await res.json() };
}

describe('change control', () => {
  it('engineer proposes a plan, the supervisor is mailed, signs in the app, and the recipe and audit trail show it', async () => {
    // A saved plan for the demo recipe, through the API as the planner saves it.
    const recipe = (await apiAs('engineer', 'GET', '/recipes')).body.recipes.find((r: { name: string }) => r.name === 'Glucose syrup DE 95');
    const plan = await apiAs('engineer', 'POST', '/plans', {
      ...inputsFromRecipe(recipe),
      uncertainty: { draws: 400, seed: 7, sensorBiasSdC: 0.3, doseRelSd: 0.05 },
    });
    expect(plan.status).toBe(201);
    const setpointText = `${plan.body.outputs.setpointC.toFixed(1)} °C`;

    // Engineer, on a phone: from the saved plan to a proposal.
    const eng = await watchedPage(browser, PHONE);
    await signIn(eng.page, server.baseURL, 'engineer');
    // The API calls above already confirmed the engineer's first-run notice.
    await eng.page.getByTestId('screen-planner').waitFor();
    await eng.page.goto(`${server.baseURL}/planner/plan/${plan.body.id}`);
    await eng.page.getByTestId('plan-propose').click();
    await eng.page.getByTestId('screen-propose-change').waitFor();
    await eng.page.getByTestId('propose-rationale').fill('Lot CGA-2605-11 keeps its activity longer than the current setpoint assumes.');
    await screenshot(eng.page, 'change-propose-390x844');
    await eng.page.getByTestId('propose-submit').click();
    await eng.page.getByTestId('screen-change-request').waitFor();
    await eng.page.getByTestId('comparison').waitFor();
    expect(await eng.page.getByTestId('record-status').textContent()).toBe('Waiting for sign-off');
    const id = Number(eng.page.url().match(/sign-offs\/(\d+)/)![1]);
    await screenshot(eng.page, 'change-request-engineer-390x844');

    // The supervisor's notice goes through the outbox to the local SMTP sink.
    const notice = await waitForMail(user('supervisor').email, /^Sign-off needed: Glucose syrup DE 95/);
    expect(notice.text).toContain(`/sign-offs/${id}`);
    const outbox = (await apiAs('admin', 'GET', '/mail-outbox')).body.messages;
    expect(outbox.find((m: { to: string; kind: string }) => m.to === user('supervisor').email && m.kind === 'change-request.proposed')).toBeTruthy();

    // Supervisor, on a wide screen: the request waits on the home screen; compare, then sign.
    const sup = await watchedPage(browser, WIDE);
    await signIn(sup.page, server.baseURL, 'supervisor');
    await acknowledgeCautions(sup.page);
    await sup.page.getByTestId('screen-sign-offs').waitFor();
    await sup.page.getByTestId(`change-request-${id}`).waitFor();
    await screenshot(sup.page, 'change-sign-offs-list-1440x900');
    await sup.page.getByTestId(`change-request-${id}`).click();
    await sup.page.getByTestId('sign-form').waitFor();
    const comparison = await sup.page.getByTestId('comparison').textContent();
    expect(comparison).toContain(`${recipe.currentSetpointC.toFixed(1)} °C held`);
    expect(comparison).toContain(`${setpointText} held`);
    expect(comparison).toMatch(/P10 \/ P50 \/ P90/);
    await screenshot(sup.page, 'change-request-supervisor-1440x900');
    await sup.page.getByTestId('sign-meaning-approved').click();
    await sup.page.getByTestId('sign-comment').fill('Matches the QC assays for this lot.');
    await sup.page.getByTestId('sign-password').fill(user('supervisor').password);
    await sup.page.getByTestId('sign-submit').click();
    await sup.page.getByTestId('signature-list').waitFor();
    expect(await sup.page.getByTestId('record-status').textContent()).toBe('Approved and released');
    const signed = await sup.page.getByTestId('signature-list').textContent();
    expect(signed).toContain(`Approved · ${user('supervisor').name} (supervisor)`);
    expect(signed).toMatch(/\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2} UTC/);
    expect(signed).toMatch(/Site time: \d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2} CES?T \(Europe\/Berlin\)/);
    await sup.page.getByTestId('sign-form').waitFor({ state: 'detached' });
    await screenshot(sup.page, 'change-request-approved-1440x900');

    // The proposer hears of the decision.
    await waitForMail(user('engineer').email, /^Your setpoint change for Glucose syrup DE 95 was approved/);

    // The recipe runs at the released setpoint from now on.
    await eng.page.goto(`${server.baseURL}/planner`);
    const card = eng.page.getByTestId(`recipe-${recipe.id}`);
    await card.waitFor();
    expect(await card.textContent()).toContain(`at ${setpointText} now · released plan ${plan.body.id}`);
    await screenshot(eng.page, 'change-recipe-released-390x844');

    // Every step is in the audit trail, as a sentence (the action codes stay in the CSV).
    await sup.page.goto(`${server.baseURL}/audit`);
    await sup.page.getByTestId('audit-table').waitFor();
    const trail = await sup.page.getByTestId('audit-table').textContent();
    for (const step of ['proposed change request', 'signed change request', 'approved change request', 'released a new setpoint for recipe'])
      expect(trail).toContain(step);
    expect(trail).not.toContain('{"');
    await sup.page.getByRole('button', { name: 'Approvals' }).click();
    await sup.page.getByTestId('audit-count').filter({ hasText: 'of 1 events' }).waitFor();
    await screenshot(sup.page, 'change-audit-approvals-1440x900');

    expect(eng.errors).toEqual([]);
    expect(sup.errors).toEqual([]);
    await eng.context.close();
    await sup.context.close();
  });
});
