import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { BUNDLE_LOADER, BUNDLE_LOADER_CSP, cutBundle, renderOverSnapshots, splitBundle, warmOrder } from '../../server/web-build/rewrite';
import { BUNDLE_PARTS_ID, WARM_ORDER_ID } from '../../src/web/page';

// An export in the shape Metro writes it: one `__d(factory, id, [dependency ids])` per module, then the entry.
function fakeExport(modules: [number, number[]][], html: string): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-export-'));
  fs.mkdirSync(path.join(dir, '_expo/static/js/web'), { recursive: true });
  const body = modules.map(([id, deps]) => `__d(function(g,r,i,a,m,e,d){m.exports=${id}},${id},[${deps.join(',')}]);`).join('\n');
  fs.writeFileSync(path.join(dir, '_expo/static/js/web/index-0abc.js'), `var __BUNDLE_START_TIME__=0;\n${body}\n__r(0);\n//# sourceMappingURL=index-0abc.js.map\n`);
  fs.writeFileSync(path.join(dir, 'index.html'), html);
  return dir;
}

describe('finishing the web export', () => {
  const dirs: string[] = [];
  afterEach(() => dirs.splice(0).forEach((d) => fs.rmSync(d, { recursive: true, force: true })));

  it('orders the modules so each comes after everything it imports, once each, through a cycle', () => {
    const dir = fakeExport([[0, [1, 3]], [1, [2, 4]], [2, []], [3, [2]], [4, [1]], [5, []]], '<html><head></head><body></body></html>');
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
    const html =
      '<html><head><title data-rh="true"></title><title>Yieldpoint</title></head><body><div id="root">x</div>' +
      '<script type="module">globalThis.__EXPO_ROUTER_HYDRATE__=true;</script></body></html>';
    const dir = fakeExport([[0, [1]], [1, []]], html);
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

  it('replaces the bundle with its parts and the page\'s script tag with the list and the loader the policy allows', () => {
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
    expect(joined).toBe(original.split('\n').filter((l) => !l.startsWith('//# ')).join('\n'));
    // The page's one inline script is the loader, and the content security policy's hash is of exactly that text.
    const inline = [...html.matchAll(/<script>(.*?)<\/script>/g)].map((m) => m[1]!);
    expect(inline).toEqual([BUNDLE_LOADER]);
    expect(BUNDLE_LOADER_CSP).toBe(`'sha256-${createHash('sha256').update(inline[0]!).digest('base64')}'`);
  });

  it('stops the build when no page loads the bundle (Expo wrote its script tag another way)', () => {
    const dir = fakeExport([[0, []]], '<html><head><script src="/elsewhere.js"></script></head><body></body></html>');
    dirs.push(dir);
    expect(() => splitBundle(dir, 2)).toThrow(/No page of the export loads index-0abc\.js/);
  });
});
