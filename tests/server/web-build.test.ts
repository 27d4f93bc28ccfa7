import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { BUNDLE_LOADER, BUNDLE_LOADER_CSP, cutBundle, renderOverSnapshots, splitBundle, warmOrder } from '../../server/web-build/rewrite';
import { BUNDLE_PARTS_ID, WARM_ORDER_ID } from '../../src/web/page';

// An export in the shape Metro writes it (the real one is checked in tests/e2e/web-pipeline.test.ts): its runtime
// with `__r.unguarded`, one `__d(factory, id, [dependency ids])` per module, then the entry (99, importing 0) started.
const RUNTIME = 'var __BUNDLE_START_TIME__=0;\n!(function(e){e.__r=i;function i(){}i.unguarded=function(e,r){}})(globalThis);';
function fakeExport(
  modules: [number, number[]][],
  html: string,
  opts: { registration?: (id: number, deps: number[]) => string; runtime?: string } = {},
): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-export-'));
  fs.mkdirSync(path.join(dir, '_expo/static/js/web'), { recursive: true });
  const register = opts.registration ?? ((id, deps) => `__d(function(g,r,i,a,m,e,d){m.exports=${id}},${id},[${deps.join(',')}]);`);
  const body = [...modules, [99, [0]] as [number, number[]]].map(([id, deps]) => register(id, deps)).join('\n');
  fs.writeFileSync(
    path.join(dir, '_expo/static/js/web/index-0abc.js'),
    `${opts.runtime ?? RUNTIME}\n${body}\n__r(99);\n//# sourceMappingURL=index-0abc.js.map\n`,
  );
  fs.writeFileSync(path.join(dir, 'index.html'), html);
  return dir;
}
const EXPO_PAGE =
  '<html><head><title data-rh="true"></title><title>Yieldpoint</title><script src="/_expo/static/js/web/index-0abc.js" defer></script></head>' +
  '<body><div id="root">x</div><script type="module">globalThis.__EXPO_ROUTER_HYDRATE__=true;</script></body></html>';

describe('finishing the web export', () => {
  const dirs: string[] = [];
  afterEach(() => dirs.splice(0).forEach((d) => fs.rmSync(d, { recursive: true, force: true })));

  it('orders the modules so each comes after everything it imports, once each, through a cycle, without the started entry', () => {
    const dir = fakeExport(
      [
        [0, [1, 3]],
        [1, [2, 4]],
        [2, []],
        [3, [2]],
        [4, [1]],
        [5, []],
      ],
      '<html><head></head><body></body></html>',
    );
    dirs.push(dir);
    const order = warmOrder(dir);
    expect([...order].sort()).toEqual([0, 1, 2, 3, 4, 5]);
    const at = (id: number) => order.indexOf(id);
    expect(at(2)).toBeLessThan(at(1));
    expect(at(2)).toBeLessThan(at(3));
    expect(at(1)).toBeLessThan(at(0));
    expect(at(3)).toBeLessThan(at(0));
  });

  it('takes out the hydration flag and the empty title, and writes the order as a data block', () => {
    const dir = fakeExport(
      [
        [0, [1]],
        [1, []],
      ],
      EXPO_PAGE,
    );
    dirs.push(dir);
    renderOverSnapshots(dir);
    const out = fs.readFileSync(path.join(dir, 'index.html'), 'utf8');
    expect(out).not.toContain('__EXPO_ROUTER_HYDRATE__');
    expect(out).not.toContain('<title data-rh="true"></title>');
    expect(out).toContain('<title>Yieldpoint</title>');
    const block = new RegExp(`<script id="${WARM_ORDER_ID}" type="application/json">(.*?)</script></head>`).exec(out);
    expect(JSON.parse(block![1]!)).toEqual([1, 0]);
  });

  it('cuts a bundle into parts of about equal length, only before a module, runtime first and start last', () => {
    const lines = ['var __BUNDLE_START_TIME__=0;', ...Array.from({ length: 40 }, (_, i) => `__d(function(){${'x'.repeat(i % 7)}},${i},[]);`), '__r(0);'];
    const parts = cutBundle(lines, 4);
    expect(parts).toHaveLength(4);
    expect(parts.join('\n')).toBe(lines.join('\n'));
    expect(parts[0]!.startsWith('var __BUNDLE_START_TIME__')).toBe(true);
    for (const part of parts.slice(1)) expect(part.startsWith('__d(')).toBe(true);
    expect(parts[3]!.endsWith('__r(0);')).toBe(true);
    const lengths = parts.map((p) => p.length);
    expect(Math.max(...lengths) - Math.min(...lengths)).toBeLessThan(lines.join('\n').length / 4);
    // A bundle with fewer modules than parts gives fewer parts, never an empty one.
    expect(cutBundle(['var a;', '__d(1);', '__r(0);'], 8).every((p) => p.length > 0)).toBe(true);
  });

  it("replaces the bundle with its parts and the page's script tag with the list and the loader the policy allows", () => {
    const modules: [number, number[]][] = Array.from({ length: 30 }, (_, i) => [i, []]);
    const tag = '<script src="/_expo/static/js/web/index-0abc.js" defer></script>';
    const dir = fakeExport(modules, `<html><head>${tag}</head><body></body></html>`);
    dirs.push(dir);
    const js = path.join(dir, '_expo/static/js/web');
    fs.writeFileSync(path.join(js, 'index-0abc.js.map'), '{}');
    const original = fs.readFileSync(path.join(js, 'index-0abc.js'), 'utf8');
    splitBundle(dir, 3);
    expect(fs.readdirSync(js).sort()).toEqual(['index-0abc-0.js', 'index-0abc-1.js', 'index-0abc-2.js']);
    const html = fs.readFileSync(path.join(dir, 'index.html'), 'utf8');
    expect(html).not.toContain(tag);
    const list = new RegExp(`<script id="${BUNDLE_PARTS_ID}" type="application/json">(.*?)</script>`).exec(html);
    const urls = JSON.parse(list![1]!) as string[];
    expect(urls).toEqual(['0', '1', '2'].map((n) => `/_expo/static/js/web/index-0abc-${n}.js`));
    // The parts, in the list's order, are the bundle without its source-map comment.
    const joined = urls.map((u) => fs.readFileSync(path.join(dir, u), 'utf8')).join('\n');
    expect(joined).toBe(
      original
        .split('\n')
        .filter((l) => !l.startsWith('//# '))
        .join('\n'),
    );
    // The page's one inline script is the loader, and the content security policy's hash is of exactly that text.
    const inline = [...html.matchAll(/<script>(.*?)<\/script>/g)].map((m) => m[1]!);
    expect(inline).toEqual([BUNDLE_LOADER]);
    expect(BUNDLE_LOADER_CSP).toBe(`'sha256-${createHash('sha256').update(inline[0]!).digest('base64')}'`);
  });

  it('reads the dependencies of a module that uses require.resolveWeak (an object with paths)', () => {
    const dir = fakeExport(
      [
        [0, [1, 2]],
        [1, []],
        [2, [1]],
      ],
      EXPO_PAGE,
      {
        registration: (id, deps) => `__d(function(){},${id},${id === 0 ? `{${deps.map((d, i) => `"${i}":${d}`).join(',')},"paths":{}}` : `[${deps}]`});`,
      },
    );
    dirs.push(dir);
    expect(warmOrder(dir)).toEqual([1, 2, 0]);
  });
});

// Each step leans on a detail of Expo's or Metro's output: when the detail changes, the step must stop the build
// with a message that says which, never ship the export without the step.
describe('a step that finds nothing to change stops the build', () => {
  const dirs: string[] = [];
  afterEach(() => dirs.splice(0).forEach((d) => fs.rmSync(d, { recursive: true, force: true })));
  const exportOf = (...args: Parameters<typeof fakeExport>) => {
    const dir = fakeExport(...args);
    dirs.push(dir);
    return dir;
  };
  const modules: [number, number[]][] = Array.from({ length: 30 }, (_, i) => [i, i ? [i - 1] : []]);

  it('when a page has no hydration flag or no empty title, naming the pages', () => {
    const second = (dir: string, html: string) => fs.writeFileSync(path.join(dir, 'sign-in.html'), html);
    const noFlag = exportOf(modules, EXPO_PAGE);
    second(noFlag, EXPO_PAGE.replace('globalThis.__EXPO_ROUTER_HYDRATE__=true;', 'globalThis.__EXPO_ROUTER_HYDRATE__ = true;'));
    expect(() => renderOverSnapshots(noFlag)).toThrow(/hydration flag: 1 of 2 pages have no hydration flag .*\(sign-in\.html\)/);
    const noTitle = exportOf(modules, EXPO_PAGE);
    second(noTitle, EXPO_PAGE.replace('<title data-rh="true"></title>', ''));
    expect(() => renderOverSnapshots(noTitle)).toThrow(/empty title: 1 of 2 pages/);
  });

  it('when it runs over its own output (it changed nothing)', () => {
    const dir = exportOf(modules, EXPO_PAGE);
    renderOverSnapshots(dir);
    expect(() => renderOverSnapshots(dir)).toThrow(/hydration flag: 1 of 1 pages/);
    splitBundle(dir, 4);
    expect(() => splitBundle(dir, 4)).toThrow(/bundle parts: expected one entry bundle index-<hash>\.js, found 0/);
  });

  it('when Metro registers modules another way, or its runtime has no unguarded require', () => {
    // Metro's development format names each module after its dependencies.
    const named = exportOf(modules, EXPO_PAGE, { registration: (id, deps) => `__d(function(){},${id},[${deps}],"src/m${id}.ts");` });
    expect(() => warmOrder(named)).toThrow(/warm-up order: index-0abc\.js has 31 module lines but 0 registrations/);
    const guarded = exportOf(modules, EXPO_PAGE, { runtime: 'var __BUNDLE_START_TIME__=0;' });
    expect(() => warmOrder(guarded)).toThrow(/defines no `__r\.unguarded`/);
    const noStart = exportOf(modules, EXPO_PAGE);
    const file = path.join(noStart, '_expo/static/js/web/index-0abc.js');
    fs.writeFileSync(file, fs.readFileSync(file, 'utf8').replace('__r(99);', 'require(99);'));
    expect(() => warmOrder(noStart)).toThrow(/starts no module/);
  });

  it('when the bundle cannot be cut (its modules do not start lines) or a page loads it another way', () => {
    const oneLine = exportOf(modules, EXPO_PAGE, { registration: (id, deps) => `;__d(function(){},${id},[${deps}]);` });
    expect(() => splitBundle(oneLine, 4)).toThrow(/could be cut into 1 part\(s\) only/);
    const otherTag = exportOf(modules, EXPO_PAGE);
    fs.writeFileSync(path.join(otherTag, 'sign-in.html'), EXPO_PAGE.replace(' defer></script>', ' async></script>'));
    expect(() => splitBundle(otherTag, 4)).toThrow(/bundle parts: 1 of 2 pages have no script tag .*\(sign-in\.html\)/);
  });
});
