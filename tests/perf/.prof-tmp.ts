import { chromium } from 'playwright-core';
import fs from 'node:fs';
import { SourceMapConsumer } from 'source-map-js';
import { DEMO_USERS } from '../../db/seed';
import { sessionCookie, startServer } from '../support/server';

async function main() {
  const web = process.argv[2];
  const role = process.argv[3] ?? 'operator';
  const pathName = process.argv[4] ?? '/batches';
  const server = await startServer({ env: { WEB_DIR: web } });
  const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox'] });
  try {
    const u = DEMO_USERS.find((x) => x.role === role)!;
    const cookie = await sessionCookie(server.baseURL, u.email, u.password);
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 } });
    const [name, value] = cookie.split(';')[0].split('=');
    await ctx.addCookies([{ name, value, url: server.baseURL }]);
    await ctx.addInitScript(() => {
      (window as any).__lt = [];
      new PerformanceObserver((l) => l.getEntries().forEach((e) => (window as any).__lt.push([Math.round(e.startTime), Math.round(e.duration)]))).observe({ type: 'longtask', buffered: true });
    });
    const page = await ctx.newPage();
    const cdp = await ctx.newCDPSession(page);
    await cdp.send('Emulation.setCPUThrottlingRate', { rate: 4 });
    await cdp.send('Profiler.enable');
    await cdp.send('Profiler.setSamplingInterval', { interval: 200 });
    await cdp.send('Profiler.start');
    const t0 = Date.now();
    await page.goto(server.baseURL + pathName, { waitUntil: 'networkidle' });
    await page.waitForTimeout(1500);
    const { profile } = (await cdp.send('Profiler.stop')) as any;
    console.log('load ms', Date.now() - t0);
    const lt = await page.evaluate(() => performance.getEntriesByType('navigation').map((e: any) => [e.domContentLoadedEventEnd, e.loadEventEnd]));
    console.log(lt);
    const lts = (await page.evaluate(() => (window as any).__lt)) as [number, number][];
    const fcp = await page.evaluate(() => performance.getEntriesByName('first-contentful-paint')[0]?.startTime ?? 0);
    console.log('FCP', Math.round(fcp), 'long tasks', JSON.stringify(lts), 'TBT~', lts.filter(([s]) => s >= fcp).reduce((a, [, d]) => a + Math.max(0, d - 50), 0));
    if (process.env.NO_PROFILE) return;
    const js = fs.readdirSync(`${web}/_expo/static/js/web`).filter((f) => f.endsWith('.js'));
    const maps = new Map(js.map((f) => [f, new SourceMapConsumer(JSON.parse(fs.readFileSync(`${web}/_expo/static/js/web/${f}.map`, 'utf8')))]));
    const dt: number[] = profile.timeDeltas;
    const self = new Map<number, number>();
    profile.samples.forEach((id: number, i: number) => self.set(id, (self.get(id) ?? 0) + (dt[i + 1] ?? 0)));
    const byFile = new Map<string, number>();
    const byFn = new Map<string, number>();
    for (const n of profile.nodes) {
      const t = (self.get(n.id) ?? 0) / 1000;
      if (!t) continue;
      const cf = n.callFrame;
      const f = js.find((x) => cf.url.endsWith(x));
      let key = cf.url ? cf.url.replace(/^.*\//, '') : `(${cf.functionName || 'native'})`;
      let fn = cf.functionName;
      if (f) {
        const pos = maps.get(f)!.originalPositionFor({ line: cf.lineNumber + 1, column: cf.columnNumber });
        const src = pos.source ?? '?';
        const m = src.match(/node_modules\/((@[^/]+\/)?[^/]+)\/(.*)/);
        key = m ? `${m[1]}/${m[3].split('/').slice(-2).join('/')}` : src.replace(/^.*?\/main\//, '');
        fn = `${key}:${pos.line} ${pos.name ?? cf.functionName}`;
      }
      byFile.set(key, (byFile.get(key) ?? 0) + t);
      byFn.set(fn, (byFn.get(fn) ?? 0) + t);
    }
    const top = (m: Map<string, number>, n: number) => [...m].sort((a, b) => b[1] - a[1]).slice(0, n).map(([k, v]) => `${v.toFixed(0).padStart(6)} ${k}`).join('\n');
    console.log('--- self ms by file (4x throttled)\n' + top(byFile, 30));
    console.log('--- by function\n' + top(byFn, 30));
  } finally {
    await browser.close();
    await server.stop();
  }
}
main().catch((e) => { console.error(e); process.exit(1); });
