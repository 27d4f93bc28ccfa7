import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exportDirOf, finishExport } from '../../server/web-build/build';
import { BUNDLE_LOADER, BUNDLE_PARTS, renderOverSnapshots, splitBundle, warmOrder } from '../../server/web-build/rewrite';
import { filesUnder, inlineScriptSources } from '../../server/web-pages';
import { BUNDLE_PARTS_ID, WARM_ORDER_ID } from '../../src/web/page';
import { ROOT, startServer } from '../support/server';
import { acknowledgeCautionsIfShown, appRendered, launch, PHONE, signIn, watchedPage } from './browser';

// The build steps on Expo's real export (the one global-setup made or found in the cache, never a second one): each
// step must change every page and the bundle as it was written to, so an Expo or Metro upgrade that moves one of
// their private details fails here, and in the build, instead of shipping an app without the step.
const exported = exportDirOf(ROOT);
const pagesOf = (dir: string) => filesUnder(dir).filter((f) => f.endsWith('.html'));
const read = (dir: string, rel: string) => fs.readFileSync(path.join(dir, rel), 'utf8');
const scriptsOf = (dir: string) => fs.readdirSync(path.join(dir, '_expo/static/js/web')).filter((f) => f.endsWith('.js'));

describe("the build steps on Expo's real export", () => {
  let dir: string;
  beforeAll(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-steps-'));
    fs.cpSync(exported, dir, { recursive: true });
  });
  afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

  it('renders over the snapshots: every page loses the hydration flag and the empty title and gains the warm-up order', () => {
    const pages = pagesOf(dir);
    // Every route's page, once bare and once in its group folder.
    expect(pages.length).toBeGreaterThan(30);
    const before = pages.map((p) => read(dir, p));
    const order = warmOrder(dir);
    renderOverSnapshots(dir);
    const bundle = read(dir, `_expo/static/js/web/${scriptsOf(dir)[0]}`);
    const registered = bundle.match(/^__d\(/gm)!.length;
    // Every module but the few the bundle starts itself (its runtime set-up and the entry), each once.
    expect(new Set(order).size).toBe(order.length);
    expect(order.length).toBeGreaterThan(registered - 5);
    expect(order.length).toBeLessThan(registered);
    pages.forEach((p, i) => {
      const html = read(dir, p);
      expect(html, p).not.toBe(before[i]);
      expect(html, p).not.toContain('__EXPO_ROUTER_HYDRATE__');
      expect(html, p).not.toContain('<title data-rh="true"></title>');
      expect(html, p).toContain('<title>Yieldpoint</title>');
      const block = new RegExp(`<script id="${WARM_ORDER_ID}" type="application/json">(.*?)</script></head>`).exec(html);
      expect(JSON.parse(block![1]!), p).toEqual(order);
    });
    // Run again, it finds nothing it was written for: it stops the build instead of passing.
    expect(() => renderOverSnapshots(dir)).toThrow(/hydration flag: \d+ of \d+ pages have no hydration flag/);
  });

  it('cuts the bundle into its parts and gives every page the list and the loader as its one inline script', () => {
    const [bundle] = scriptsOf(dir);
    const original = read(dir, `_expo/static/js/web/${bundle}`);
    splitBundle(dir);
    const parts = scriptsOf(dir).sort((a, b) => Number(/-(\d+)\.js$/.exec(a)![1]) - Number(/-(\d+)\.js$/.exec(b)![1]));
    expect(parts).toHaveLength(BUNDLE_PARTS);
    expect(parts.map((p) => read(dir, `_expo/static/js/web/${p}`)).join('\n')).toBe(
      original
        .split('\n')
        .filter((l) => !l.startsWith('//# '))
        .join('\n'),
    );
    for (const p of pagesOf(dir)) {
      const html = read(dir, p);
      expect(html, p).not.toContain(bundle);
      const list = new RegExp(`<script id="${BUNDLE_PARTS_ID}" type="application/json">(.*?)</script>`).exec(html);
      expect(JSON.parse(list![1]!), p).toEqual(parts.map((f) => `/_expo/static/js/web/${f}`));
      expect(
        [...html.matchAll(/<script>(.*?)<\/script>/g)].map((m) => m[1]),
        p,
      ).toEqual([BUNDLE_LOADER]);
    }
    expect(() => splitBundle(dir)).toThrow(/bundle parts: expected one entry bundle/);
  });
});

// The off switch: WEB_PIPELINE=plain serves Expo's export with none of the rewrites, only the service worker and
// the compressed copies beside it, and the app still starts under the content security policy.
describe('WEB_PIPELINE=plain', () => {
  let browser: Browser;
  let dir: string;
  let server: Awaited<ReturnType<typeof startServer>>;
  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-plain-'));
    await finishExport(ROOT, exported, dir, 'plain');
    server = await startServer({ env: { WEB_DIR: dir } });
    browser = await launch();
  });
  afterAll(async () => {
    await browser?.close();
    await server?.stop();
    fs.rmSync(dir, { recursive: true, force: true });
    if (server) fs.rmSync(server.dir, { recursive: true, force: true });
  });

  it("serves Expo's own pages and bundle, and the app starts on them with no error and no blocked script", async () => {
    for (const p of pagesOf(exported)) expect(read(dir, p), p).toBe(read(exported, p));
    expect(scriptsOf(dir)).toEqual(scriptsOf(exported));
    expect(fs.existsSync(path.join(dir, 'sw.js'))).toBe(true);
    const { page, context, errors } = await watchedPage(browser, PHONE);
    await page.addInitScript(
      'window.cspViolations = []; document.addEventListener("securitypolicyviolation", (e) => window.cspViolations.push(e.violatedDirective));',
    );
    const response = await page.goto(`${server.baseURL}/sign-in`);
    // The policy allows Expo's own inline scripts by their hashes, and no other.
    expect(response!.headers()['content-security-policy']).toContain(`script-src 'self' ${inlineScriptSources(dir).join(' ')};`);
    await appRendered(page);
    await signIn(page, server.baseURL, 'operator');
    await acknowledgeCautionsIfShown(page, 'screen-batches');
    // A signed-in page opened afresh: the snapshot has no session, the app's first render has one.
    await page.reload();
    await appRendered(page);
    await page.getByTestId('screen-batches').waitFor();
    expect(await page.evaluate('window.cspViolations')).toEqual([]);
    expect(errors).toEqual([]);
    await context.close();
  });
});
